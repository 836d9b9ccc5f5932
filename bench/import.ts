/**
 * Import throughput: importBundle on a real ising2d bundle against a plain COPY of the same values.
 * Usage: node --conditions=react-server --import tsx bench/import.ts [measurements=200000] [reps=3]
 * Needs the project's PostgreSQL (lib/env.ts settings) with the migrated template database
 * (ERGODEX_PG_TEMPLATE_DB, default ergodex_template); works in a throwaway clone of it and a
 * throwaway archive folder. Values = rows × columns, the sweep column included. Interleaved REPS
 * times, medians printed:
 *   - importBundle end to end: manifest and hash checks, csv parsing, archiving, binary COPY of
 *     the float8[] chunks, run and point estimates, commit;
 *   - the estimate step alone (computeRunEstimates on the same in-memory series, rolled back),
 *     so the ingest part (import minus estimates) can be read off too;
 *   - plain COPY: series.csv streamed as it is into a (sweep, e, absM, m2, m4) float8 table,
 *     one row per measurement, the server parsing the csv.
 * Target: import / plain COPY ≥ 0.5. Not part of the tests.
 */
import crypto from "node:crypto";
import { execFileSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";

const measurements = Number(process.argv[2] ?? 200_000);
const reps = Number(process.argv[3] ?? 3);
if (!(Number.isInteger(measurements) && measurements >= 100 && Number.isInteger(reps) && reps >= 1)) {
  console.error("usage: bench/import.ts [measurements>=100] [reps>=1]");
  process.exit(2);
}
const scratch = fs.mkdtempSync(path.join(os.tmpdir(), "ergodex-bench-import-"));
process.env.ERGODEX_DATA_DIR = path.join(scratch, "data"); // archive goes here, not into .data/

const { default: pg } = await import("pg");
const { databaseUrl, env } = await import("@/lib/env");
const { createSequelize, setSequelize } = await import("@/lib/db/sequelize");
const { initModels } = await import("@/models");
const { importBundle } = await import("@/lib/importer/import-bundle");
const { pgClientOf } = await import("@/lib/importer/copy-series");
const { computeRunEstimates } = await import("@/lib/estimates/compute-run-estimates");
const { default: copyStreams } = await import("pg-copy-streams");
const { pipeline } = await import("node:stream/promises");
const { parseCsvSeries } = await import("@/lib/importer/parse-series");
const { SAMPLER_CATALOG } = await import("@/lib/samplers/schemas");

const repoRoot = path.resolve(import.meta.dirname, "..");
const template = process.env.ERGODEX_PG_TEMPLATE_DB || "ergodex_template";
const dbName = `ergodex_bench_${crypto.randomBytes(4).toString("hex")}`;
const admin = new pg.Client({ connectionString: databaseUrl("postgres") });
await admin.connect();
await admin.query(`CREATE DATABASE "${dbName}" TEMPLATE "${template}"`);
const sequelize = createSequelize(databaseUrl(dbName), { poolMax: 4 });
setSequelize(sequelize);
const m = initModels(sequelize);

const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];
const PARAMS = { L: 8, T: 2.3, algorithm: "metropolis" };
const SEED = "20251201";

try {
  const info = SAMPLER_CATALOG.ising2d;
  const group = await m.Group.create({ slug: "bench", name: "Bench", institute: "Bench" });
  const owner = await m.User.create({ email: "bench@bench.example", name: "Bench", role: "researcher", passwordHash: null });
  const sampler = await m.Sampler.create({ name: info.name, version: info.version, command: "bench", paramsSchema: info.paramsSchema as Record<string, unknown>, observables: info.observables.map((o) => ({ ...o })) });
  const ensemble = await m.Ensemble.create({ name: "bench", ownerId: owner.id, groupId: group.id, samplerId: sampler.id, allocationId: null, clusterId: null, spec: {}, specHash: "0".repeat(64), masterSeed: SEED });
  const point = await m.ParameterPoint.create({ ensembleId: ensemble.id, pointIndex: 0, params: PARAMS });
  const runs = await m.Run.bulkCreate(Array.from({ length: reps }, (_, replica) => ({ ensembleId: ensemble.id, pointId: point.id, replica, seed: SEED })), { returning: true });

  // One real bundle; each repetition imports a copy naming its own run (identical seed, so it validates).
  const runJson = path.join(scratch, "run.json");
  fs.writeFileSync(runJson, JSON.stringify({ format: "ergodex.run/1", runId: runs[0].id, sampler: { name: "ising2d", version: info.version }, params: PARAMS, seed: SEED, thermalization: 100, measurements, interval: 1 }));
  const bundle = path.join(scratch, "bundle");
  const t0 = performance.now();
  execFileSync(process.execPath, [path.join(repoRoot, "node_modules/tsx/dist/cli.mjs"), path.join(repoRoot, "cluster-fake/samplers/cli.ts"), "ising2d", runJson, bundle]);
  const seriesBytes = fs.statSync(path.join(bundle, "series.csv")).size;
  console.log(`bundle: ${measurements} rows × 5 columns, series.csv ${(seriesBytes / 1e6).toFixed(1)} MB, sampled in ${((performance.now() - t0) / 1000).toFixed(1)} s`);

  const parsed = await parseCsvSeries(path.join(bundle, "series.csv"), "series.csv", info.observables.map((o) => o.name), measurements);
  const values = parsed.rows * parsed.columns.length;
  await sequelize.query(`CREATE TABLE bench_copy (sweep float8 NOT NULL, e float8 NOT NULL, "absM" float8 NOT NULL, m2 float8 NOT NULL, m4 float8 NOT NULL)`);
  const byName = new Map(parsed.columns.map((c, k) => [c, parsed.values[k]] as const));
  class Rollback extends Error {}

  const importSecs: number[] = [];
  const estimateSecs: number[] = [];
  const copySecs: number[] = [];
  for (let i = 0; i < reps; i++) {
    const dir = path.join(scratch, `copy-${i}`);
    fs.cpSync(bundle, dir, { recursive: true });
    const manifestFile = path.join(dir, "manifest.json");
    const manifest = JSON.parse(fs.readFileSync(manifestFile, "utf8"));
    manifest.runId = runs[i].id;
    fs.writeFileSync(manifestFile, JSON.stringify(manifest, null, 2) + "\n");

    let t = performance.now();
    const result = await importBundle({ runId: runs[i].id, dir, source: "cluster" });
    importSecs.push((performance.now() - t) / 1000);
    if (result.status !== "imported" || result.rows !== measurements) throw new Error(`import ${i} did not import: ${JSON.stringify(result)}`);

    t = performance.now();
    await sequelize.transaction(async (transaction) => {
      await computeRunEstimates(runs[i].id, { transaction, series: byName });
      throw new Rollback();
    }).catch((err) => { if (!(err instanceof Rollback)) throw err; });
    estimateSecs.push((performance.now() - t) / 1000);

    t = performance.now();
    await sequelize.transaction(async (transaction) => {
      const sink = pgClientOf(transaction).query(copyStreams.from(`COPY bench_copy FROM STDIN WITH (FORMAT csv, HEADER)`));
      await pipeline(fs.createReadStream(path.join(bundle, "series.csv")), sink);
    });
    copySecs.push((performance.now() - t) / 1000);
    console.log(`rep ${i + 1}: import ${importSecs[i].toFixed(2)} s (estimates alone ${estimateSecs[i].toFixed(2)} s), plain COPY ${copySecs[i].toFixed(2)} s`);
  }
  // Ratios per repetition, then medians: the machine is shared, and a slow moment should hit
  // both sides of one ratio rather than mix different moments.
  const fmt = (v: number) => Math.round(v).toLocaleString("en-US");
  const ratio = median(importSecs.map((t, i) => copySecs[i] / t));
  const ingest = importSecs.map((t, i) => Math.max(1e-3, t - estimateSecs[i]));
  const ratioIngest = median(ingest.map((t, i) => copySecs[i] / t));
  console.log(`values per import: ${fmt(values)} (archive under ${env.archiveDir}); medians of ${reps}:`);
  console.log(`importBundle end to end:          ${fmt(values / median(importSecs))} values/s`);
  console.log(`  of which the estimate step:     ${median(estimateSecs).toFixed(2)} s (measured apart, same series)`);
  console.log(`  without the estimate step:      ${fmt(values / median(ingest))} values/s`);
  console.log(`plain COPY of series.csv:         ${fmt(values / median(copySecs))} values/s`);
  console.log(`ratio import / plain COPY:        ${ratio.toFixed(2)} end to end, ${ratioIngest.toFixed(2)} without the estimate step (target ≥ 0.5)`);
} finally {
  await sequelize.close();
  await admin.query(`DROP DATABASE IF EXISTS "${dbName}" WITH (FORCE)`);
  await admin.end();
  fs.rmSync(scratch, { recursive: true, force: true });
}
