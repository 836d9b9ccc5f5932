import "server-only";
// A replayed bundle (fetched into a local folder) against the run's archived files: every result file
// byte for byte, and the sampler build that made each (name, version, code hash from the manifests).
import fs from "node:fs";
import path from "node:path";
import { AppError } from "@/lib/errors";
import { resolveArchived } from "@/lib/storage/archive-path";
import { gatherRuns } from "../gather";
import { compareFile } from "./compare-files";
import type { ReplayReport, SamplerBuild } from "./replay-run";

/** Files a sampler rewrites with wall-clock content: never byte-identical, so not compared (manifest: startedAt, host; progress: updatedAt). */
const TIMESTAMPED = new Set(["manifest.json", "progress.json"]);

type Manifest = { sampler?: { name?: string; version?: string; commit?: string }; series?: { file?: string; encoding?: string }; observables?: unknown[]; host?: string };

function readManifest(file: string, what: string): Manifest {
  try {
    return JSON.parse(fs.readFileSync(file, "utf8")) as Manifest;
  } catch (err) {
    throw new AppError("invalid", `${what} manifest.json is unreadable: ${(err as Error).message}`);
  }
}

const build = (m: Manifest | null): SamplerBuild => ({ name: m?.sampler?.name ?? null, version: m?.sampler?.version ?? null, commit: m?.sampler?.commit ?? null });
const where = (d: { offset: number; row: number | null; sweep: number | null }) =>
  `byte ${d.offset}${d.row !== null ? `, row ${d.row}` : ""}${d.sweep !== null ? ` (sweep ${d.sweep})` : ""}`;

/** Compare the bundle in `dir` with run `runId`'s archive; the fields of the report this decides. */
export async function compareBundle(runId: string, dir: string): Promise<Pick<ReplayReport, "outcome" | "differences" | "files" | "skipped" | "sampler" | "host">> {
  const [run] = await gatherRuns([runId]);
  if (!run) throw new AppError("not_found", `run ${runId} does not exist`);
  const manifestRow = run.files.find((f) => f.role === "manifest");
  const archived = manifestRow ? readManifest(resolveArchived(manifestRow.storagePath), "the archived") : null;
  const replay = fs.existsSync(path.join(dir, "manifest.json")) ? readManifest(path.join(dir, "manifest.json"), "the replay's") : null;
  // The archived run's build: its manifest, else what the run row recorded at collection.
  const before: SamplerBuild = archived ? build(archived) : { name: run.sampler.name, version: run.sampler.version, commit: run.samplerCommit };
  const after = replay ? build(replay) : null;

  const differences: string[] = [];
  if (!replay) differences.push("the replay wrote no manifest.json");
  if (after) {
    for (const k of ["name", "version", "commit"] as const) {
      if (before[k] !== after[k]) differences.push(`sampler ${k}: archived ${before[k] ?? "(none)"}, replay ${after[k] ?? "(none)"}`);
    }
  }
  const seriesPath = archived?.series?.file ?? run.files.find((f) => f.role === "series")?.path;
  const encoding = archived?.series?.encoding === "f64le" ? "f64le" : "csv";
  const columns = 1 + (archived?.observables?.length ?? 0);
  const files: ReplayReport["files"] = [];
  const skipped: ReplayReport["skipped"] = [];
  for (const f of run.files) {
    if (TIMESTAMPED.has(path.posix.basename(f.path))) { skipped.push({ path: f.path, why: "rewritten with the wall-clock time on every run" }); continue; }
    const archivedFile = resolveArchived(f.storagePath);
    if (!fs.existsSync(archivedFile)) {
      differences.push(`${f.path}: the archived copy is missing`);
      files.push({ path: f.path, archivedSha256: f.sha256, replaySha256: null, identical: false, difference: { kind: "missing" }, archiveIntact: false });
      continue;
    }
    const local = path.join(dir, ...f.path.split("/"));
    const c = compareFile(f.path, archivedFile, f.sha256, local, f.path === seriesPath ? { encoding, columns } : undefined);
    if (!c.archiveIntact) differences.push(`${f.path}: the archived copy no longer hashes to its recorded sha256 ${f.sha256}`);
    if (c.difference?.kind === "missing") differences.push(`${f.path}: the replay did not write it`);
    else if (c.difference) {
      differences.push(`${f.path}: first differs at ${where(c.difference)}; archived ${c.difference.archivedBytes} bytes sha256 ${f.sha256}, replay ${c.difference.replayBytes} bytes sha256 ${c.replaySha256}`);
    }
    files.push(c);
  }
  // A file the replay wrote that the archive does not have is a difference too (a new extra output).
  const known = new Set(run.files.map((f) => f.path));
  for (const name of fs.existsSync(dir) ? fs.readdirSync(dir, { recursive: true, withFileTypes: false }) as string[] : []) {
    const rel = name.split(path.sep).join("/");
    if (!known.has(rel) && fs.statSync(path.join(dir, name)).isFile() && !TIMESTAMPED.has(path.posix.basename(rel)) && rel !== "checkpoint.json") {
      differences.push(`${rel}: written by the replay, not in the archive`);
    }
  }
  return { outcome: differences.length === 0 ? "identical" : "differs", differences, files, skipped, sampler: { archived: before, replay: after }, host: replay?.host ?? null };
}
