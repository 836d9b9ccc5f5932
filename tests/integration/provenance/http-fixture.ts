// A real ensemble in the running test stack's database for the HTTP tests of manuscripts, provenance and audit:
// 2 points × 2 replicas of the ising2d CLI, imported by the real importer, point estimates combined.
import { computePointEstimates } from "@/lib/estimates/compute-point-estimates";
import { importBundle } from "@/lib/importer/import-bundle";
import { SAMPLER_CATALOG } from "@/lib/samplers/schemas";
import { transitionRun } from "@/lib/runs/transition-run";
import { db, type Ensemble, type Group, type Run } from "@/models";
import { makeEnsemble } from "@/tests/support/db";
import { registerIsing, sampleBundle } from "@/tests/integration/importer/bundles";

/** Temperatures no other test uses, so these series' archive files are this file's own (the archive is content-addressed). */
export const HTTP_POINTS = [{ L: 6, T: 2.219, algorithm: "metropolis" }, { L: 6, T: 2.587, algorithm: "metropolis" }];

/** Build the ensemble for `group`, owned by `ownerId` (a few seconds: four sampler processes and four imports). */
export async function buildHttpEnsemble(group: Group, ownerId: string): Promise<{ ensemble: Ensemble; runs: Run[] }> {
  const owner = (await db().User.findByPk(ownerId))!;
  const sampler = (await db().Sampler.findOne({ where: { name: "ising2d", version: SAMPLER_CATALOG.ising2d.version } })) ?? (await registerIsing());
  const { ensemble, runs, points } = await makeEnsemble({ owner, group, sampler, cluster: null, points: HTTP_POINTS, replicas: 2 });
  for (const run of runs) {
    const dir = sampleBundle(run, points.find((p) => p.id === run.pointId)!.params, { measurements: 300, thermalization: 20 });
    for (const to of ["dispatched", "running", "collecting"] as const) await transitionRun(run.id, to, { cause: "test.flow" });
    await importBundle({ runId: run.id, dir, source: "cluster" });
    await transitionRun(run.id, "done", { cause: "test.flow" });
  }
  for (const p of points) await computePointEstimates(p.id);
  return { ensemble, runs };
}
