import "server-only";
// The run a bundle is imported as, with its point and sampler: what validation compares the manifest to.
import type { Transaction } from "sequelize";
import { modelsFor } from "@/lib/db/models-for";
import { AppError } from "@/lib/errors";
import type { Run } from "@/models/run";
import type { RunSource } from "@/models/run";
import { bundleError } from "./bundle-error";
import type { Manifest } from "./manifest-schema";
import { MANIFEST } from "./read-manifest";
import type { BundleExpectation } from "./validate-bundle";

/** A run with what the importer needs of it. */
export type RunContext = { run: Run; samplerName: string; samplerVersion: string; observables: string[]; params: Record<string, unknown> };

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

/** Load run `runId` with its point and its ensemble's sampler, or null when there is no such run. */
export async function loadRunContext(runId: string, transaction?: Transaction): Promise<RunContext | null> {
  if (!UUID.test(runId)) return null;
  const m = modelsFor(transaction);
  const run = await m.Run.findByPk(runId, {
    transaction,
    include: [{ model: m.ParameterPoint, as: "point" }, { model: m.Ensemble, as: "ensemble", include: [{ model: m.Sampler, as: "sampler" }] }],
  });
  const sampler = run?.ensemble?.sampler;
  if (!run || !sampler || !run.point) return null;
  return {
    run, samplerName: sampler.name, samplerVersion: sampler.version,
    observables: (sampler.observables ?? []).map((o) => o.name), params: run.point.params,
  };
}

/**
 * The run for a bundle: the given one (it must exist), or for runId null the run the manifest
 * names (a bundle of an Ergodex run brought in by hand). Returns the expectation for validation.
 */
export async function resolveRun(
  runId: string | null, source: RunSource, manifest: Manifest, transaction?: Transaction, preloaded?: RunContext,
): Promise<{ context: RunContext; expectation: BundleExpectation }> {
  let context: RunContext | null;
  if (runId !== null) {
    context = preloaded?.run.id === runId ? preloaded : await loadRunContext(runId, transaction);
    if (!context) throw new AppError("not_found", `run ${runId} does not exist (or has no point or sampler)`);
  } else {
    context = await loadRunContext(manifest.runId, transaction);
    if (!context) throw bundleError({ file: MANIFEST, field: "/runId" }, `${JSON.stringify(manifest.runId)} is not a known run; create the run first or pass its id`);
  }
  const checkIdentity = source === "cluster" || runId === null;
  return {
    context,
    expectation: {
      runId: checkIdentity ? context.run.id : undefined,
      seed: checkIdentity ? context.run.seed : undefined,
      sampler: { name: context.samplerName, version: context.samplerVersion, observables: context.observables },
      params: context.params,
    },
  };
}
