// The body of POST /api/v1/planner: what to plan for, parsed once at the edge.
import { axisValues } from "@/lib/spec/expand-spec";
import { ensembleSpecSchema, type ParamValue, type ScanAxis } from "@/lib/spec/schema";
import { SPEC_LIMITS } from "@/lib/spec/limits";
import { AppError } from "@/lib/errors";
import type { PlanRequest } from "./types";

/** The request as sent: a point (`params`) or a scan (`fixed` + `scan`, as in an ensemble spec). */
export type PlannerBody = {
  sampler: string;
  observable: string;
  targetError: number;
  replicas: number;
  params?: Record<string, ParamValue>;
  fixed?: Record<string, ParamValue>;
  scan?: ScanAxis[];
  interval?: number;
  thermalization?: number;
  cores?: number;
  wallMargin?: number;
  pilotEnsembleId?: string;
};

const spec = ensembleSpecSchema.properties;
const MAX_POINTS = 2000;

/** JSON Schema (2020-12) of {@link PlannerBody}. */
export const plannerBodySchema = {
  type: "object",
  additionalProperties: false,
  required: ["sampler", "observable", "targetError", "replicas"],
  properties: {
    sampler: { type: "string", minLength: 1, maxLength: 100, description: "sampler name, e.g. ising2d" },
    observable: { type: "string", minLength: 1, maxLength: 100, description: "observable (series column or derived estimate), e.g. e" },
    targetError: { type: "number", exclusiveMinimum: 0, description: "wanted error of each point's combined estimate" },
    replicas: spec.replicas,
    params: spec.fixed,
    fixed: spec.fixed,
    scan: spec.scan,
    // no default here (the spec's is 1): an absent interval means the pilots' own
    interval: { type: "integer", minimum: 1, maximum: SPEC_LIMITS.interval, description: "sweeps between measurements; default the pilots'" },
    thermalization: spec.thermalization,
    cores: spec.resources.properties.cores,
    wallMargin: { type: "number", minimum: 1, maximum: 10, description: "factor on the expected run time for the suggested wall time" },
    pilotEnsembleId: { type: "string", format: "uuid", description: "use only this ensemble's estimates" },
  },
  $defs: ensembleSpecSchema.$defs,
} as const;

/** The planner's request from a validated body: `params` and `fixed` merged, the scan expanded. */
export function toPlanRequest(b: PlannerBody): PlanRequest {
  const fixed = { ...(b.params ?? {}), ...(b.fixed ?? {}) };
  const axes = b.scan ?? [];
  let points: Record<string, ParamValue>[] = [fixed];
  axes.forEach((axis, i) => {
    if (axis.param in fixed) throw new AppError("invalid", `scan parameter ${axis.param} is also fixed`, { issues: [{ path: `/scan/${i}/param`, message: "is also fixed" }] });
    const values = axisValues(axis);
    points = points.flatMap((p) => values.map((v) => ({ ...p, [axis.param]: v })));
    if (points.length > MAX_POINTS) throw new AppError("invalid", `the scan has more than ${MAX_POINTS} points; plan a part of it`, { issues: [{ path: "/scan", message: `more than ${MAX_POINTS} points` }] });
  });
  return {
    sampler: b.sampler, observable: b.observable, targetError: b.targetError, replicas: b.replicas, points,
    ...(b.interval !== undefined ? { interval: b.interval } : {}),
    ...(b.thermalization !== undefined ? { thermalization: b.thermalization } : {}),
    ...(b.cores !== undefined ? { cores: b.cores } : {}),
    ...(b.wallMargin !== undefined ? { wallMargin: b.wallMargin } : {}),
  };
}
