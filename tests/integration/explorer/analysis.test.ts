// Run analysis, re-analysis saving and the spectrum view on real imported runs (bundles made by the sampler CLI).
import { execFileSync } from "node:child_process";
import fs from "node:fs";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { loadIdentity, type Identity } from "@/lib/auth/identity";
import { importBundle } from "@/lib/importer/import-bundle";
import { computePointEstimates } from "@/lib/estimates/compute-point-estimates";
import { runAnalysis } from "@/lib/explorer/run-analysis";
import { saveReanalysis } from "@/lib/explorer/save-reanalysis";
import { runSpectrum } from "@/lib/explorer/run-spectrum";
import { SAMPLER_CATALOG } from "@/lib/samplers/schemas";
import { db, type Run } from "@/models";
import { makeEnsemble, makeGroup, makeUser, useTestDatabase } from "@/tests/support/db";
import { cleanupTemp, readCsv, registerIsing, sampleBundle, tempDir } from "../importer/bundles";

useTestDatabase();
afterAll(cleanupTemp);
const repoRoot = path.resolve(import.meta.dirname, "../../..");
const audit = { actorId: null, ip: null, requestId: "test" };
const PARAMS = { L: 8, T: 2.3, algorithm: "metropolis" };
let runs: Run[];
let owner: Identity;
let bundle: string;

/** Run the real loggas CLI for `run` and return its bundle folder (spectrum.csv among its files). */
function loggasBundle(run: Run, params: Record<string, unknown>): string {
  const dir = tempDir("ergodex-loggas-");
  const runJson = path.join(dir, "run.json");
  fs.writeFileSync(runJson, JSON.stringify({ format: "ergodex.run/1", runId: run.id, sampler: { name: "loggas", version: SAMPLER_CATALOG.loggas.version },
    params, seed: run.seed, thermalization: 0, measurements: 200, interval: 1 }));
  const out = path.join(dir, "out");
  execFileSync(process.execPath, [path.join(repoRoot, "node_modules/tsx/dist/cli.mjs"), path.join(repoRoot, "cluster-fake/samplers/cli.ts"), "loggas", runJson, out], { stdio: "pipe" });
  return out;
}

beforeAll(async () => {
  const group = await makeGroup();
  const user = await makeUser("researcher", group);
  owner = (await loadIdentity(user.id, "session"))!;
  const sampler = await registerIsing();
  ({ runs } = await makeEnsemble({ owner: user, group, sampler, cluster: null, points: [PARAMS], replicas: 2 }));
  for (const r of runs) {
    const dir = sampleBundle(r, PARAMS, { measurements: 3000 });
    if (r.replica === 0) bundle = dir;
    await importBundle({ runId: r.id, dir, source: "cluster" });
    await r.update({ state: "done" });
  }
  await computePointEstimates(runs[0].pointId);
}, 60_000);

describe("runAnalysis (nothing saved)", () => {
  it("returns the series decimated to ≤ 2000 points, the cut, ACF with window and the recomputed estimate", async () => {
    const a = await runAnalysis(runs[0].id, { observable: "e", cut: 500, window: "madras-sokal", c: 8 });
    const csv = readCsv(bundle).get("e")!;
    expect(a.series.total).toBe(3000);
    expect(a.series.stride).toBe(2);
    expect(a.series.shown).toBe(1500);
    expect(a.series.points[7]).toEqual({ i: 14, sweep: readCsv(bundle).get("sweep")![14], value: csv[14] });
    expect(a.cut).toEqual({ index: 500, rule: "user" });
    expect(a.estimate.n).toBe(2500);
    // the mean after the cut is the plain average of the csv values past it
    const tail = Array.from(csv.subarray(500));
    expect(a.estimate.mean).toBeCloseTo(tail.reduce((x, y) => x + y, 0) / tail.length, 12);
    expect(a.acf.rho[0]).toBe(1);
    expect(a.acf.method).toBe("gamma-madras-sokal");
    // τ_int = 1/2 + Σ_{t=1}^{W} ρ(t) (Wolff 2004, eq. 30): the reported value is the curve at the marked window
    expect(a.tauInt).toBeCloseTo(a.acf.tauIntByWindow[a.acf.window], 10);
    expect(a.tauInt).toBeCloseTo(0.5 + a.acf.rho.slice(1, a.acf.window + 1).reduce((x, y) => x + y, 0), 10);
    expect(a.blocking?.levels[0].blockSize).toBe(1);
    expect(a.estimate.saved).toBe(false);
    expect(await db().Estimate.count({ where: { runId: runs[0].id, observable: "e" } })).toBe(1);
  });

  it("refuses a cut that leaves too few points, naming the cut", async () => {
    await expect(runAnalysis(runs[0].id, { observable: "e", cut: 2995 })).rejects.toMatchObject({ code: "invalid", details: { issues: [{ path: "cut" }] } });
  });
});

describe("saveReanalysis", () => {
  it("writes version 2 as current, keeps version 1, records who and when, recomputes the point and audits", async () => {
    const before = await db().Estimate.findOne({ where: { scope: "point", pointId: runs[0].pointId, observable: "e", isCurrent: true } });
    const saved = await saveReanalysis(audit, owner, runs[0].id, { observable: "e", cut: 1000 });
    expect(saved.previousVersion).toBe(1);
    const versions = await db().Estimate.findAll({ where: { scope: "run", runId: runs[0].id, observable: "e" }, order: [["version", "ASC"]] });
    expect(versions.map((v) => [v.version, v.isCurrent])).toEqual([[1, false], [2, true]]);
    expect(versions[1]).toMatchObject({ thermCut: 1000, n: 2000, chosenById: owner.userId });
    expect(versions[1].chosenAt).toBeInstanceOf(Date);
    expect(versions[0].chosenById).toBeNull();
    const point = await db().Estimate.findOne({ where: { scope: "point", pointId: runs[0].pointId, observable: "e", isCurrent: true } });
    expect(point!.version).toBe(before!.version + 1);
    expect(saved.pointEstimates).toContainEqual({ observable: "e", version: point!.version });
    expect(await db().AuditEntry.count({ where: { action: "estimate.reanalyse", targetId: runs[0].id } })).toBe(1);
  });

  it("is refused with a 409 while a frozen manuscript rests on the run, and writes nothing", async () => {
    const m = db();
    const group = (await m.Ensemble.findByPk(runs[1].ensembleId))!.groupId;
    const ms = await m.Manuscript.create({ groupId: group, title: "Frozen paper", createdById: owner.userId });
    await m.Exhibit.create({ manuscriptId: ms.id, label: "Fig. 1", kind: "figure", query: {}, snapshot: { runs: [runs[1].id] }, snapshotHash: "0".repeat(64) });
    const [[{ present }]] = (await m.sequelize.query(`SELECT to_regclass('provenance.frozen_items') IS NOT NULL AS present`)) as [[{ present: boolean }], unknown];
    if (present) await m.sequelize.query(`INSERT INTO provenance.frozen_items VALUES ($1, 'run', $2)`, { bind: [ms.id, runs[1].id] });
    await ms.update({ state: "frozen", frozenAt: new Date(), frozenById: owner.userId });
    const count = await m.Estimate.count();
    await expect(saveReanalysis(audit, owner, runs[1].id, { observable: "e", cut: 100 })).rejects.toMatchObject({ code: "conflict", status: 409 });
    expect(await m.Estimate.count()).toBe(count);
  });
});

describe("runSpectrum on a real loggas run", () => {
  it("reads spectrum.csv from the archive: counting function, Weyl fit and d_s(σ)", async () => {
    const group = await makeGroup();
    const user = await makeUser("researcher", group);
    const info = SAMPLER_CATALOG.loggas;
    const sampler = await db().Sampler.create({ name: info.name, version: info.version, command: "npm run sampler -- loggas",
      paramsSchema: info.paramsSchema as Record<string, unknown>, observables: info.observables.map((o) => ({ ...o })) });
    const params = { N: 200, beta: 2, method: "tridiagonal" };
    const { runs: [run] } = await makeEnsemble({ owner: user, group, sampler, cluster: null, points: [params], replicas: 1 });
    const dir = loggasBundle(run, params);
    await importBundle({ runId: run.id, dir, source: "cluster" });
    const eig = fs.readFileSync(path.join(dir, "spectrum.csv"), "utf8").trim().split("\n").slice(1).map(Number);
    const sp = await runSpectrum(run.id);
    expect(sp.eigenvalues).toBe(200);
    expect(sp.lambdaMin).toBe(Math.min(...eig));
    expect(sp.shift).toBeCloseTo(-Math.min(...eig), 12);
    expect(sp.counting[sp.counting.length - 1].N).toBe(200); // N(λ_max) counts every eigenvalue
    // d_s(σ) = 2σ⟨λ⟩_σ tends to 0 at large σ with the one zero mode made by the shift (finite-volume fall)
    expect(sp.zeroModes).toBe(1);
    expect(sp.heatKernel[sp.heatKernel.length - 1].ds).toBeLessThan(sp.heatKernel[Math.floor(sp.heatKernel.length / 2)].ds);
    await expect(runSpectrum(runs[0].id)).rejects.toMatchObject({ code: "not_found" });
  }, 30_000);
});
