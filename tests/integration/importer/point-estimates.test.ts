// Per-point estimates: replicas combined by inverse variance, a disagreeing replica flagged.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { computePointEstimates } from "@/lib/estimates/compute-point-estimates";
import { importBundle } from "@/lib/importer/import-bundle";
import { transitionRun } from "@/lib/runs/transition-run";
import { db, type ParameterPoint, type Run } from "@/models";
import { makeEnsemble, makeGroup, makeUser, useTestDatabase } from "@/tests/support/db";
import { cleanupTemp, copyBundle, editCsv, sampleBundle, registerIsing } from "./bundles";

useTestDatabase();
const PARAMS = { L: 8, T: 2.3, algorithm: "metropolis" };
// χ² quantile of 1 degree of freedom at 0.99 (standard tables, recalled from memory): p < 0.01 ⇔ χ² > 6.6349.
const CHI2_1DOF_99 = 6.6349;
let point: ParameterPoint;
let runs: Run[];
const bundles: string[] = [];

// As the broker does: a finished run is collecting while its bundle is imported, done afterwards.
async function collect(run: Run) {
  for (const state of ["dispatched", "collecting"] as const) await transitionRun(run.id, state, { cause: "test.collect" });
}
async function markDone(run: Run) {
  await transitionRun(run.id, "done", { cause: "test.collect" });
}
// Import a replica as the broker does: collecting, import, done, then the point's estimates.
async function importReplica(run: Run, dir: string) {
  await collect(run);
  await importBundle({ runId: run.id, dir, source: "cluster" });
  await markDone(run);
  return computePointEstimates(run.pointId);
}

async function current(observable: string) {
  const rows = await db().Estimate.findAll({ where: { pointId: point.id, observable, scope: "point" }, order: [["version", "ASC"]] });
  return { rows, now: rows.find((r) => r.isCurrent)! };
}

async function runEstimates(observable: string, ids: string[]) {
  const rows = await db().Estimate.findAll({ where: { scope: "run", observable, isCurrent: true } });
  return ids.map((id) => rows.find((r) => r.runId === id)!);
}

afterAll(cleanupTemp);

beforeAll(async () => {
  const group = await makeGroup();
  const owner = await makeUser("researcher", group);
  const sampler = await registerIsing();
  let points: ParameterPoint[];
  ({ runs, points } = await makeEnsemble({ owner, group, sampler, points: [PARAMS], replicas: 3 }));
  point = points[0];
  for (const run of runs) bundles.push(sampleBundle(run, PARAMS, { measurements: 2000 }));
});

describe("computePointEstimates", () => {
  it("with one replica passes its estimate through, without chi²", async () => {
    await importReplica(runs[0], copyBundle(bundles[0]));
    const { now } = await current("e");
    const [r0] = await runEstimates("e", [runs[0].id]);
    expect(now.error).toBeCloseTo(r0.error, 14); // 1/sqrt(1/σ²) is σ up to rounding
    expect(now).toMatchObject({ mean: r0.mean, thermCut: r0.thermCut, chi2dof: null, flagged: false, runId: null, version: 1, n: r0.n, params: PARAMS });
  });

  it("with two replicas gives the inverse-variance mean, its error and chi²/dof", async () => {
    await importReplica(runs[1], copyBundle(bundles[1]));
    for (const observable of ["e", "absM", "m2", "U4", "C"]) {
      const reps = await runEstimates(observable, [runs[0].id, runs[1].id]);
      // Weighted mean with weights 1/σ² (inverse-variance weighting, e.g. Bevington & Robinson 2003, §4.1).
      const w = reps.map((r) => 1 / r.error ** 2);
      const sw = w[0] + w[1];
      const mean = (w[0] * reps[0].mean + w[1] * reps[1].mean) / sw;
      const chi2 = w[0] * (reps[0].mean - mean) ** 2 + w[1] * (reps[1].mean - mean) ** 2;
      const { now, rows } = await current(observable);
      expect(now.version, observable).toBe(2);
      expect(rows.filter((r) => r.isCurrent)).toHaveLength(1);
      expect(now.mean, observable).toBeCloseTo(mean, 12);
      // PDG scale factor: the error grows by sqrt(χ²/dof) when that exceeds 1.
      expect(now.error, observable).toBeCloseTo(Math.sqrt(1 / sw) * Math.sqrt(Math.max(1, chi2)), 12);
      expect(now.chi2dof, observable).toBeCloseTo(chi2, 10);
      expect(now.flagged, observable).toBe(chi2 > CHI2_1DOF_99);
      expect(now.n).toBe(reps[0].n + reps[1].n);
    }
  });

  it("stores nothing new when the combination has not changed", async () => {
    const before = await db().Estimate.count({ where: { scope: "point" } });
    const result = await computePointEstimates(point.id);
    expect(result.estimates).toHaveLength(0);
    expect(result.unchanged).toContain("e");
    expect(await db().Estimate.count({ where: { scope: "point" } })).toBe(before);
  });

  it("flags a replica whose energy disagrees far beyond the error bars", async () => {
    const dir = copyBundle(bundles[2]);
    // Shift every energy by +0.1 per site, several times the error of a 2000-sweep mean (≈ 0.014 here).
    editCsv(dir, (lines) => {
      for (let i = 1; i < lines.length; i++) {
        const cells = lines[i].split(",");
        cells[1] = String(Number(cells[1]) + 0.1);
        lines[i] = cells.join(",");
      }
    });
    await importReplica(runs[2], dir);
    const reps = await runEstimates("e", runs.map((r) => r.id));
    const w = reps.map((r) => 1 / r.error ** 2);
    const sw = w.reduce((a, b) => a + b, 0);
    const mean = reps.reduce((a, r, i) => a + w[i] * r.mean, 0) / sw;
    const chi2 = reps.reduce((a, r, i) => a + w[i] * (r.mean - mean) ** 2, 0);
    const { now, rows } = await current("e");
    expect(rows.map((r) => [r.version, r.isCurrent])).toEqual([[1, false], [2, false], [3, true]]);
    expect(now.flagged).toBe(true);
    expect(now.chi2dof).toBeCloseTo(chi2 / 2, 8);
    // With 2 dof the χ² survival is exactly exp(−χ²/2), so p < 0.01 ⇔ χ²/dof > ln 100 ≈ 4.605.
    expect(now.chi2dof!).toBeGreaterThan(Math.log(100));
    expect(now.mean).toBeCloseTo(mean, 12);
    expect(now.error).toBeCloseTo(Math.sqrt(1 / sw) * Math.sqrt(chi2 / 2), 12);
  });
});

describe("which replicas count", () => {
  it("done runs, and collecting runs with an accepted import; not queued or cancelled ones", async () => {
    const group = await makeGroup();
    const owner = await makeUser("researcher", group);
    const sampler = await db().Sampler.findOne({ where: { name: "ising2d" } });
    const { runs: three, points } = await makeEnsemble({ owner, group, sampler: sampler!, points: [PARAMS], replicas: 3 });
    const dirs = three.map((run) => sampleBundle(run, PARAMS, { measurements: 300 }));
    await collect(three[0]);
    await importBundle({ runId: three[0].id, dir: dirs[0], source: "cluster" }); // collecting, imported: counts
    await importBundle({ runId: three[1].id, dir: dirs[1], source: "cluster" }); // imported while queued: does not
    await collect(three[2]);
    await importBundle({ runId: three[2].id, dir: dirs[2], source: "cluster" });
    await transitionRun(three[2].id, "cancelled", { cause: "test.cancel" }); // cancelled: does not
    const result = await computePointEstimates(points[0].id);
    const e = result.estimates.find((x) => x.observable === "e")!;
    const [r0] = await runEstimates("e", [three[0].id]);
    expect(e).toMatchObject({ mean: r0.mean, chi2dof: null, n: r0.n });
  });

  it("refuses an unknown point", async () => {
    await expect(computePointEstimates("00000000-0000-4000-8000-000000000000")).rejects.toMatchObject({ code: "not_found" });
  });
});
