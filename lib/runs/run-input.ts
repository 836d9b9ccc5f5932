// The run.json the broker stages next to the sampler (DESIGN.md "Run input", format ergodex.run/1).
import { validate } from "@/lib/validation";
import { runInputSchema } from "@/lib/samplers/schemas";

/** run.json as DESIGN.md defines it: the samplers' own type, so the two sides cannot drift. */
export type { RunInput } from "@/lib/samplers/validate";
import type { RunInput } from "@/lib/samplers/validate";

/** What run.json is built from: the run, its point, its ensemble's spec and sampler. */
export type RunInputSource = {
  run: { id: string; seed: string };
  point: { params: Record<string, unknown> };
  spec: Record<string, unknown>;
  sampler: { name: string; version: string };
};

/** Build and check a run's run.json; a spec without the sweep counts is refused naming the field. */
export function buildRunInput({ run, point, spec, sampler }: RunInputSource): RunInput {
  const input = {
    format: "ergodex.run/1" as const,
    runId: run.id,
    sampler: { name: sampler.name, version: sampler.version },
    params: { ...point.params },
    seed: run.seed,
    thermalization: spec.thermalization as number,
    measurements: spec.measurements as number,
    interval: (spec.interval as number | undefined) ?? 1,
  };
  // A copy goes through ajv (its useDefaults would add "encoding"); the document staged is ours.
  validate(runInputSchema, structuredClone(input), `run.json of run ${run.id}`);
  return input;
}
