// A real ising2d bundle imported end to end: series by COPY, estimates, archive; re-import is a no-op.
import fs from "node:fs";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { ANALYSIS_VERSION, binderCumulant, estimateSeries, gammaMethod, specificHeat, susceptibility } from "@/lib/analysis";
import { env } from "@/lib/env";
import { AppError } from "@/lib/errors";
import { importBundle } from "@/lib/importer/import-bundle";
import { loadSeries } from "@/lib/importer/load-series";
import { computeRunEstimates } from "@/lib/estimates/compute-run-estimates";
import { db, type Run } from "@/models";
import { makeEnsemble, makeGroup, makeUser, useTestDatabase } from "@/tests/support/db";
import { kaufmanEnergy } from "@/tests/unit/samplers/ising-exact";
import { cleanupTemp, copyBundle, editManifest, readCsv, sampleBundle, sha256Of, registerIsing, tableCounts } from "./bundles";

useTestDatabase();
const PARAMS = { L: 8, T: 2.3, algorithm: "metropolis" };
// 5000 rows > 4096 values per chunk, so every column spans two Series rows.
const ROWS = 5000;
let runs: Run[];
let csvBundle: string;
let f64Bundle: string;
let uploader: Awaited<ReturnType<typeof makeUser>>;

afterAll(cleanupTemp);

beforeAll(async () => {
  const group = await makeGroup();
  const owner = await makeUser("researcher", group);
  uploader = owner;
  const sampler = await registerIsing();
  ({ runs } = await makeEnsemble({ owner, group, sampler, points: [PARAMS], replicas: 5 }));
  csvBundle = sampleBundle(runs[0], PARAMS, { measurements: ROWS });
  f64Bundle = sampleBundle(runs[1], PARAMS, { measurements: 300, encoding: "f64le" });
});

describe("importBundle with a good csv bundle", () => {
  let dir: string;
  let result: Awaited<ReturnType<typeof importBundle>>;
  beforeAll(async () => {
    dir = copyBundle(csvBundle);
    result = await importBundle({ runId: runs[0].id, dir, source: "cluster" });
  });

  it("reports what it imported and records an accepted Import keyed by the manifest's sha256", async () => {
    expect(result).toMatchObject({ status: "imported", runId: runs[0].id, observables: ["e", "absM", "m2", "m4"], rows: ROWS });
    const imp = await db().Import.findByPk(result.importId);
    expect(imp).toMatchObject({ state: "accepted", rejectReason: null, source: "cluster", runId: runs[0].id });
    expect(imp!.bundleHash).toBe(sha256Of(path.join(dir, "manifest.json")));
  });

  it("stores every column in chunks that reassemble to exactly the csv values", async () => {
    const csv = readCsv(dir);
    for (const [name, values] of csv) {
      const stored = await loadSeries(runs[0].id, name);
      expect(stored.length, name).toBe(ROWS);
      expect(Array.from(stored), name).toEqual(Array.from(values));
    }
    const chunks = (await db().sequelize.query(
      `SELECT observable, chunk_index, start_row, cardinality("values") AS n FROM series WHERE run_id = $1 ORDER BY observable, chunk_index`,
      { bind: [runs[0].id], type: "SELECT" },
    )) as { observable: string; chunk_index: number; start_row: number; n: number }[];
    expect(chunks).toHaveLength(5 * 2);
    expect(chunks.filter((c) => c.observable === "e")).toEqual([
      { observable: "e", chunk_index: 0, start_row: 0, n: 4096 }, { observable: "e", chunk_index: 1, start_row: 4096, n: ROWS - 4096 },
    ]);
  });

  it("writes one current estimate per observable, equal to the analysis library on the csv columns", async () => {
    const csv = readCsv(dir);
    const rows = await db().Estimate.findAll({ where: { runId: runs[0].id, scope: "run" } });
    const by = new Map(rows.map((r) => [r.observable, r]));
    expect([...by.keys()].sort()).toEqual(["C", "U4", "absM", "chi", "e", "m2", "m4"]);
    for (const r of rows) expect(r).toMatchObject({ isCurrent: true, version: 1, analysisVersion: ANALYSIS_VERSION, params: PARAMS, ensembleId: runs[0].ensembleId });
    for (const name of ["e", "absM", "m2", "m4"]) {
      const want = estimateSeries(csv.get(name)!);
      expect(by.get(name)).toMatchObject({ mean: want.mean, error: want.error, tauInt: want.tauInt, thermCut: want.cut.index, n: want.n, window: want.window, method: want.method });
      expect(want.cut.index + want.n).toBe(ROWS);
    }
    // Derived quantities: the library's blocked jackknife with the cut and bins its default rule
    // gives — largest input cut, bins of ceil(20·max τ_int) (here τ of the stored estimates, and of
    // e² for C), at least 20 bins — equal to rounding.
    const thermo = { sites: 64, temperature: 2.3 };
    const rule = (names: string[], extraTau: (cut: number) => number[] = () => []) => {
      const cut = Math.max(...names.map((n) => by.get(n)!.thermCut));
      const tau = Math.max(...names.map((n) => by.get(n)!.tauInt!), ...extraTau(cut));
      return { cut, binSize: Math.min(Math.ceil(20 * tau), Math.floor((ROWS - cut) / 20)) };
    };
    // Means to rounding; errors, spreads of nearly equal leave-one-out values, to 1e-9 relative
    // (rounding amplified by |mean|/error·sqrt(bins)).
    const close = (got: number, want: number, rel = 1e-12) => expect(Math.abs(got - want)).toBeLessThanOrEqual(rel * Math.abs(want));
    const e = csv.get("e")!;
    const wanted = {
      U4: binderCumulant(csv.get("m2")!, csv.get("m4")!, rule(["m2", "m4"])),
      chi: susceptibility(csv.get("absM")!, csv.get("m2")!, thermo, rule(["absM", "m2"])),
      C: specificHeat(e, thermo, rule(["e"], (cut) => [gammaMethod(e.map((v) => v * v).subarray(cut)).tauInt])),
    };
    for (const [name, want] of Object.entries(wanted)) {
      close(by.get(name)!.mean, want.mean);
      close(by.get(name)!.error, want.error, 1e-9);
      expect(by.get(name)).toMatchObject({ method: "jackknife-blocked", thermCut: want.cut.index, n: want.n });
    }
  });

  it("gives an energy that agrees with Kaufman's exact 8×8 value within 5 of its own error bars", async () => {
    // Kaufman (1949) finite-lattice partition function; 5σ so a correct chain fails with p ≈ 6e-7.
    const e = await db().Estimate.findOne({ where: { runId: runs[0].id, observable: "e" } });
    const exact = kaufmanEnergy(8, 2.3);
    expect(e!.error).toBeGreaterThan(0);
    expect(Math.abs(e!.mean - exact)).toBeLessThan(5 * e!.error);
    const u4 = await db().Estimate.findOne({ where: { runId: runs[0].id, observable: "U4" } });
    // U4 lies between 0 (disorder) and 2/3 (order) by construction (Binder 1981).
    expect(u4!.mean).toBeGreaterThan(0);
    expect(u4!.mean).toBeLessThan(2 / 3);
  });

  it("archives manifest, series and progress by sha256 on disk and indexes them for the run", async () => {
    const links = await db().RunArtifact.findAll({ where: { runId: runs[0].id }, order: [["path", "ASC"]] });
    expect(links.map((l) => [l.path, l.role])).toEqual([["manifest.json", "manifest"], ["progress.json", "extra"], ["series.csv", "series"]]);
    for (const link of links) {
      const artifact = await db().Artifact.findByPk(link.artifactSha256);
      const archived = path.join(env.archiveDir, artifact!.storagePath);
      expect(artifact!.storagePath).toBe(`${link.artifactSha256.slice(0, 2)}/${link.artifactSha256.slice(2, 4)}/${link.artifactSha256}`);
      expect(sha256Of(archived)).toBe(link.artifactSha256);
      expect(sha256Of(path.join(dir, link.path))).toBe(link.artifactSha256);
      expect(artifact!.bytes).toBe(fs.statSync(archived).size);
    }
    expect((await db().Artifact.findByPk(links[2].artifactSha256))!.mediaType).toBe("text/csv");
  });

  it("records the sampler commit and host from the manifest on the run", async () => {
    const manifest = JSON.parse(fs.readFileSync(path.join(dir, "manifest.json"), "utf8"));
    const run = await db().Run.findByPk(runs[0].id);
    expect(run).toMatchObject({ samplerCommit: manifest.sampler.commit, host: manifest.host });
    expect(manifest.sampler.commit).toMatch(/^sha256:[0-9a-f]{64}$/);
  });

  it("treats a second import of the same bundle, from another folder too, as a no-op", async () => {
    const before = await tableCounts();
    const again = await importBundle({ runId: runs[0].id, dir, source: "cluster" });
    const elsewhere = await importBundle({ runId: runs[0].id, dir: copyBundle(csvBundle), source: "cluster" });
    expect(again).toMatchObject({ status: "already-imported", importId: result.importId, rows: ROWS });
    expect(elsewhere).toMatchObject({ status: "already-imported", importId: result.importId });
    expect(await tableCounts()).toEqual(before);
    expect(before.accepted).toBe(1);
  });

  it("refuses the same bundle as another run", async () => {
    await expect(importBundle({ runId: runs[2].id, dir, source: "cluster" })).rejects.toMatchObject({ code: "conflict" });
  });

  it("recomputes on demand as a new version, reading the series back from the database", async () => {
    const { estimates } = await computeRunEstimates(runs[0].id);
    const e = estimates.find((x) => x.observable === "e")!;
    expect(e.version).toBe(2);
    const all = await db().Estimate.findAll({ where: { runId: runs[0].id, observable: "e" }, order: [["version", "ASC"]] });
    expect(all.map((x) => [x.version, x.isCurrent])).toEqual([[1, false], [2, true]]);
    expect(all[1].mean).toBe(all[0].mean); // same data, same analysis
  });
});

describe("importBundle with an f64le bundle", () => {
  it("decodes the little-endian columns exactly", async () => {
    const dir = copyBundle(f64Bundle);
    const result = await importBundle({ runId: runs[1].id, dir, source: "cluster" });
    expect(result).toMatchObject({ status: "imported", rows: 300 });
    const raw = fs.readFileSync(path.join(dir, "series.f64le"));
    const stored = await loadSeries(runs[1].id, "m2");
    for (let r = 0; r < 300; r++) expect(stored[r]).toBe(raw.readDoubleLE((r * 5 + 3) * 8));
    const sweeps = await loadSeries(runs[1].id, "sweep");
    expect(sweeps[0]).toBe(51);
    expect(sweeps[299]).toBe(350);
  });

  it("refuses a run id that does not exist with not_found", async () => {
    const dir = copyBundle(f64Bundle);
    editManifest(dir, (m) => { m.host = "elsewhere"; }); // a bundle not imported yet, so the run is looked up
    const err = await importBundle({ runId: "00000000-0000-4000-8000-000000000000", dir, source: "cluster" }).catch((e) => e);
    expect(err).toBeInstanceOf(AppError);
    expect(err.code).toBe("not_found");
  });
});

describe("importBundle for uploads", () => {
  it("imports a bundle from elsewhere as the given run, without requiring its run id or seed, recording the uploader", async () => {
    const dir = copyBundle(sampleBundle(runs[2], PARAMS, { measurements: 200 }));
    editManifest(dir, (m) => { m.runId = "lab-b/chain-0007"; m.seed = "99"; });
    const result = await importBundle({ runId: runs[2].id, dir, source: "upload", uploadedById: uploader.id, originalNames: ["chain7/manifest.json", "chain7/series.csv"] });
    expect(result).toMatchObject({ status: "imported", runId: runs[2].id, rows: 200 });
    expect(await db().Import.findByPk(result.importId)).toMatchObject({ source: "upload", uploadedById: uploader.id, originalNames: ["chain7/manifest.json", "chain7/series.csv"] });
  });

  it("finds the run from the manifest when no run id is given", async () => {
    const dir = copyBundle(sampleBundle(runs[3], PARAMS, { measurements: 200 }));
    const result = await importBundle({ runId: null, dir, source: "upload" });
    expect(result).toMatchObject({ status: "imported", runId: runs[3].id });
    expect((await loadSeries(runs[3].id, "e")).length).toBe(200);
  });
});

describe("importBundle run twice at once", () => {
  it("imports once: the other call finds it already imported and nothing is duplicated", async () => {
    const src = sampleBundle(runs[4], PARAMS, { measurements: 300 });
    const results = await Promise.all([0, 1].map(() => importBundle({ runId: runs[4].id, dir: copyBundle(src), source: "cluster" })));
    expect(results.map((r) => r.status).sort()).toEqual(["already-imported", "imported"]);
    expect(results[0].importId).toBe(results[1].importId);
    expect(await db().Import.count({ where: { runId: runs[4].id } })).toBe(1);
    expect(await db().Series.count({ where: { runId: runs[4].id, observable: "e" } })).toBe(1);
    expect(await db().Estimate.count({ where: { runId: runs[4].id, observable: "e" } })).toBe(1);
  });
});
