// A real ensemble for the provenance tests: 2 points × 2 replicas of the ising2d CLI, imported by the
// real importer, runs done, point estimates combined, and one manual re-analysis of a cut.
import { estimateSeries } from "@/lib/analysis";
import { computePointEstimates } from "@/lib/estimates/compute-point-estimates";
import { writeEstimateVersions } from "@/lib/estimates/write-estimates";
import { importBundle } from "@/lib/importer/import-bundle";
import { loadSeries } from "@/lib/importer/load-series";
import { transitionRun } from "@/lib/runs/transition-run";
import { db, type Run, type User, type Group, type Ensemble } from "@/models";
import { makeCluster, makeEnsemble, makeGroup, makeUser } from "@/tests/support/db";
import { registerIsing, sampleBundle } from "@/tests/integration/importer/bundles";

export { cleanupTemp } from "@/tests/integration/importer/bundles";

/** Unusual temperatures so no other test's archive file shares these series' bytes (files are content-addressed). */
export const POINTS = [{ L: 6, T: 2.137, algorithm: "metropolis" }, { L: 6, T: 2.693, algorithm: "metropolis" }];
export const MEASUREMENTS = 400;
/** The manual cut the researcher chooses for observable "e" of the first run. */
export const MANUAL_CUT = 37;

export type ProvFixture = { group: Group; pi: User; researcher: User; viewer: User; ensemble: Ensemble; runs: Run[]; manualEstimateId: string };

/** Build the fixture (a few seconds: four sampler processes and four imports). */
export async function buildFixture(): Promise<ProvFixture> {
  const group = await makeGroup();
  const pi = await makeUser("pi", group);
  const researcher = await makeUser("researcher", group);
  const viewer = await makeUser("viewer", group);
  const sampler = await registerIsing();
  const cluster = await makeCluster();
  const { ensemble, runs, points } = await makeEnsemble({ owner: researcher, group, sampler, cluster, points: POINTS, replicas: 2 });
  for (const run of runs) {
    const params = points.find((p) => p.id === run.pointId)!.params;
    const dir = sampleBundle(run, params, { measurements: MEASUREMENTS, thermalization: 20 });
    for (const to of ["dispatched", "running", "collecting"] as const) await transitionRun(run.id, to, { cause: "test.flow" });
    await importBundle({ runId: run.id, dir, source: "cluster" });
    await transitionRun(run.id, "done", { cause: "test.flow" });
  }
  // The PI moves the cut of e on the first run by hand: a new version beside the automatic one.
  const first = runs[0];
  const x = await loadSeries(first.id, "e");
  const e = estimateSeries(x, { cut: MANUAL_CUT });
  const point = points.find((p) => p.id === first.pointId)!;
  const [manual] = await db().sequelize.transaction(async (transaction) => {
    await db().sequelize.query(`SELECT 1 FROM runs WHERE id = $1 FOR NO KEY UPDATE`, { bind: [first.id], transaction });
    return writeEstimateVersions("run", first.id, [{
      pointId: first.pointId, ensembleId: first.ensembleId, params: point.params, observable: "e", mean: e.mean, error: e.error,
      tauInt: e.tauInt, tauIntError: e.tauIntError, thermCut: e.cut.index, n: e.n, window: e.window, method: e.method,
      analysisVersion: e.analysisVersion, chosenById: pi.id, chosenAt: new Date(),
    }], transaction);
  });
  for (const p of points) await computePointEstimates(p.id);
  const fresh = await db().Run.findAll({ where: { ensembleId: ensemble.id }, order: [["replica", "ASC"]] });
  return { group, pi, researcher, viewer, ensemble, runs: runs.map((r) => fresh.find((f) => f.id === r.id)!), manualEstimateId: manual.id };
}
