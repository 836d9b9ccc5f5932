// Real result bundles for the importer tests: made by the sampler CLI, copied per test, edited on purpose.
import crypto from "node:crypto";
import { execFileSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { db, type Run, type Sampler } from "@/models";
import { SAMPLER_CATALOG } from "@/lib/samplers/schemas";

const repoRoot = path.resolve(import.meta.dirname, "../../..");

const made: string[] = [];

/** A temporary folder removed by {@link cleanupTemp}. */
export function tempDir(prefix = "ergodex-import-"): string {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), prefix));
  made.push(dir);
  return dir;
}

/** Remove every folder made by {@link tempDir} (call in afterAll). */
export function cleanupTemp(): void {
  for (const dir of made.splice(0)) fs.rmSync(dir, { recursive: true, force: true });
}

/** The built-in ising2d sampler as registered in the app (name, version and observables from the catalogue). */
export async function registerIsing(): Promise<Sampler> {
  const info = SAMPLER_CATALOG.ising2d;
  return db().Sampler.create({
    name: info.name, version: info.version, command: "npm run sampler -- ising2d", paramsSchema: info.paramsSchema as Record<string, unknown>,
    observables: info.observables.map((o) => ({ ...o })),
  });
}

/** Run the real ising2d CLI for `run` (its id, seed and point params) into a new folder; returns the folder. */
export function sampleBundle(run: Run, params: Record<string, unknown>, options: { measurements: number; thermalization?: number; encoding?: "csv" | "f64le" }): string {
  const dir = tempDir("ergodex-bundle-");
  const runJson = path.join(dir, "run.json");
  fs.writeFileSync(runJson, JSON.stringify({
    format: "ergodex.run/1", runId: run.id, sampler: { name: "ising2d", version: SAMPLER_CATALOG.ising2d.version },
    params, seed: run.seed, thermalization: options.thermalization ?? 50, measurements: options.measurements, interval: 1,
    encoding: options.encoding ?? "csv",
  }));
  const out = path.join(dir, "out");
  execFileSync(process.execPath, [path.join(repoRoot, "node_modules/tsx/dist/cli.mjs"), path.join(repoRoot, "cluster-fake/samplers/cli.ts"), "ising2d", runJson, out], { stdio: "pipe" });
  return out;
}

/** A fresh copy of bundle `src` that a test may change. */
export function copyBundle(src: string): string {
  const dir = tempDir();
  fs.cpSync(src, dir, { recursive: true });
  return dir;
}

type ManifestJson = Record<string, any>; // eslint-disable-line @typescript-eslint/no-explicit-any

/** Read, change and write back manifest.json. */
export function editManifest(dir: string, change: (m: ManifestJson) => void): void {
  const file = path.join(dir, "manifest.json");
  const m = JSON.parse(fs.readFileSync(file, "utf8"));
  change(m);
  fs.writeFileSync(file, JSON.stringify(m, null, 2) + "\n");
}

/** Recompute sha256 and bytes of every listed file, so an edit reaches the series checks instead of the hash check. */
export function fixHashes(dir: string): void {
  editManifest(dir, (m) => {
    for (const f of m.files) {
      const data = fs.readFileSync(path.join(dir, f.path));
      f.sha256 = crypto.createHash("sha256").update(data).digest("hex");
      f.bytes = data.length;
    }
  });
}

/** Change the csv series line by line (index 0 is the header), then fix the manifest hashes. */
export function editCsv(dir: string, change: (lines: string[]) => void, fix = true): void {
  const file = path.join(dir, "series.csv");
  const lines = fs.readFileSync(file, "utf8").split("\n");
  const last = lines.pop(); // "" after the final newline
  change(lines);
  fs.writeFileSync(file, lines.join("\n") + "\n" + (last ?? ""));
  if (fix) fixHashes(dir);
}

/** The csv series parsed independently of the importer: columns by header name. */
export function readCsv(dir: string): Map<string, Float64Array> {
  const [header, ...rows] = fs.readFileSync(path.join(dir, "series.csv"), "utf8").trimEnd().split("\n");
  const names = header.split(",");
  const cols = names.map(() => new Float64Array(rows.length));
  rows.forEach((line, r) => line.split(",").forEach((v, c) => { cols[c][r] = Number(v); }));
  return new Map(names.map((n, c) => [n, cols[c]]));
}

/** Row counts of the tables a bundle import writes. */
export async function tableCounts(): Promise<Record<string, number>> {
  const [rows] = (await db().sequelize.query(`SELECT
      (SELECT count(*) FROM series)::int AS series, (SELECT count(*) FROM estimates)::int AS estimates,
      (SELECT count(*) FROM run_artifacts)::int AS run_artifacts, (SELECT count(*) FROM artifacts)::int AS artifacts,
      (SELECT count(*) FROM imports WHERE state = 'accepted')::int AS accepted,
      (SELECT count(*) FROM imports WHERE state = 'rejected')::int AS rejected`)) as [Record<string, number>[], unknown];
  return rows[0];
}

/** sha256 (hex) of a file's bytes. */
export function sha256Of(file: string): string {
  return crypto.createHash("sha256").update(fs.readFileSync(file)).digest("hex");
}
