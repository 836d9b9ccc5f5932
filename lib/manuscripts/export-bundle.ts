import "server-only";
// The manuscript bundle: one .zip a collaborator can check without Ergodex. It holds a README, the data behind
// each exhibit as CSV, the PROV-JSON, the archived files beneath the exhibits, a SHA256SUMS file (coreutils
// format, so `sha256sum -c` checks it) and manifest.json with the same hashes plus what each file is.
import crypto from "node:crypto";
import fs from "node:fs";
import { Readable } from "node:stream";
import yazl from "yazl";
import { modelsFor } from "@/lib/db/models-for";
import { concise } from "@/lib/format";
import { provForManuscript } from "@/lib/provenance/prov-for";
import type { ExhibitSnapshot } from "@/lib/provenance/prov-for";
import { resolveArchived } from "@/lib/storage/archive-path";
import { loadManuscript } from "./access";
import type { ExhibitQuery } from "./exhibit-query";
import { snapshotExhibit } from "./freeze-manuscript";

/** Archived files larger than this in total are listed with their hashes but left out of the zip (say so in the README). */
export const BUNDLE_ARCHIVE_LIMIT = 256 * 1024 * 1024;

/** One file of the bundle as manifest.json lists it. */
export type BundleEntry = { path: string; sha256: string; bytes: number; what: string; included: boolean };

const sha = (b: Buffer | string) => crypto.createHash("sha256").update(b).digest("hex");
const slug = (s: string) => s.toLowerCase().replace(/[^a-z0-9]+/g, "-").replace(/^-|-$/g, "") || "exhibit";
const cell = (s: string) => (/[",\n\r]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s);
const num = (x: number | null | undefined) => (x === null || x === undefined ? "" : String(x));

/** The data behind one exhibit: one row per estimate, every parameter as its own column, values at full precision. */
export function exhibitCsv(label: string, snap: ExhibitSnapshot): string {
  const params = [...new Set(snap.estimates.flatMap((e) => Object.keys(e.params ?? {})))].sort();
  const head = ["estimate_id", "scope", "observable", ...params.map((p) => `param_${p}`), "mean", "error", "concise", "tau_int", "therm_cut", "window", "method", "analysis_version", "version", "run_id", "point_id", "inputs"];
  const rows = snap.estimates.map((e) => [e.id, e.scope, e.observable, ...params.map((p) => String(e.params?.[p] ?? "")), num(e.mean), num(e.error), concise(e.mean, e.error),
    num(e.tauInt), num(e.thermCut), num(e.window), e.method, e.analysisVersion, num(e.version), e.runId ?? "", e.pointId, e.inputs.join(" ")]);
  return [`# exhibit: ${label}`, head.join(","), ...rows.map((r) => r.map((c) => cell(c)).join(","))].join("\n") + "\n";
}

/** Build the bundle of manuscript `id`; frozen manuscripts use their snapshots, drafts the estimates their queries select now. */
export async function exportBundle(id: string): Promise<{ filename: string; stream: Readable; entries: BundleEntry[] }> {
  const m = modelsFor();
  const ms = await loadManuscript(id);
  const exhibits = await m.Exhibit.findAll({ where: { manuscriptId: id }, order: [["position", "ASC"]] });
  const snaps: { label: string; caption: string | null; kind: string; hash: string | null; snap: ExhibitSnapshot | null }[] = [];
  for (const x of exhibits) {
    let snap = x.snapshot as unknown as ExhibitSnapshot | null;
    // a draft's exhibit is read as it stands today, in a read-only transaction; an exhibit that selects nothing is listed empty
    if (!snap) snap = await m.sequelize.transaction({ readOnly: true } as never, (t) => snapshotExhibit(ms.groupId, x.label, x.query as ExhibitQuery, t)).catch(() => null);
    snaps.push({ label: x.label, caption: x.caption, kind: x.kind, hash: x.snapshotHash, snap });
  }
  const zip = new yazl.ZipFile();
  const entries: BundleEntry[] = [];
  const mtime = ms.frozenAt ?? new Date();
  const put = (path: string, content: Buffer | string, what: string) => {
    const buf = Buffer.isBuffer(content) ? content : Buffer.from(content, "utf8");
    zip.addBuffer(buf, path, { mtime });
    entries.push({ path, sha256: sha(buf), bytes: buf.length, what, included: true });
  };

  const exhibitFiles = snaps.map((s, i) => `exhibits/${String(i + 1).padStart(2, "0")}-${slug(s.label)}.csv`);
  snaps.forEach((s, i) => put(exhibitFiles[i], exhibitCsv(s.label, s.snap ?? { estimates: [], runs: [], files: [] }), `data behind ${s.kind} "${s.label}"`));
  put("provenance.prov.json", JSON.stringify(await provForManuscript(id), null, 1), "W3C PROV-JSON of the manuscript");

  // archived files beneath the exhibits, once each, under archive/<run>/<path>; their recorded sha256 goes to the
  // manifest (not a fresh hash of the bytes on disk), so a file changed in the archive fails the collaborator's check
  const files = new Map(snaps.flatMap((s) => s.snap?.files ?? []).map((f) => [`${f.runId}/${f.path}`, f]));
  const storage = new Map(((await m.sequelize.query(`SELECT sha256, storage_path FROM artifacts WHERE sha256 = ANY($1)`,
    { bind: [[...new Set([...files.values()].map((f) => f.sha256))]], type: "SELECT" })) as { sha256: string; storage_path: string }[]).map((r) => [r.sha256, r.storage_path]));
  let budget = BUNDLE_ARCHIVE_LIMIT;
  for (const [key, f] of [...files].sort(([a], [b]) => a.localeCompare(b))) {
    const where = storage.get(f.sha256);
    const full = where ? resolveArchived(where) : null;
    const included = !!full && fs.existsSync(full) && f.bytes <= budget;
    if (included) { zip.addFile(full!, `archive/${key}`, { mtime }); budget -= f.bytes; }
    entries.push({ path: `archive/${key}`, sha256: f.sha256, bytes: f.bytes, what: `archived file of run ${f.runId}`, included });
  }

  const readme = readmeText(ms, snaps, exhibitFiles, entries);
  put("README.md", readme, "this description");
  const sums = entries.filter((e) => e.included).map((e) => `${e.sha256}  ${e.path}`).join("\n") + "\n";
  put("SHA256SUMS", sums, "sha256 of every other file in the zip, for sha256sum -c");
  const manifest = {
    format: "ergodex.manuscript-bundle/1", manuscript: { id: ms.id, title: ms.title, journal: ms.journal, state: ms.state, frozenAt: ms.frozenAt },
    exhibits: snaps.map((s, i) => ({ label: s.label, kind: s.kind, caption: s.caption, snapshotHash: s.hash, file: exhibitFiles[i], estimates: s.snap?.estimates.length ?? 0, runs: s.snap?.runs ?? [] })),
    files: entries.map((e) => ({ path: e.path, sha256: e.sha256, bytes: e.bytes, what: e.what, included: e.included })),
  };
  zip.addBuffer(Buffer.from(JSON.stringify(manifest, null, 1)), "manifest.json", { mtime });
  zip.end();
  return { filename: `${slug(ms.title)}-${ms.id.slice(0, 8)}.zip`, stream: zip.outputStream as unknown as Readable, entries };
}

function readmeText(ms: { title: string; journal: string | null; state: string; frozenAt: Date | null; id: string }, snaps: { label: string; caption: string | null; kind: string; hash: string | null; snap: ExhibitSnapshot | null }[], files: string[], entries: BundleEntry[]): string {
  const left = entries.filter((e) => !e.included);
  return [
    `# ${ms.title}`, "",
    `Manuscript ${ms.id}${ms.journal ? `, for ${ms.journal}` : ""}. ${ms.state === "frozen" ? `Frozen ${ms.frozenAt?.toISOString()}: the numbers below are the snapshot taken then.` : "DRAFT, not frozen: the numbers are the current estimates and may still change."}`, "",
    "## Exhibits", "",
    "| exhibit | kind | data | estimates | snapshot sha256 | caption |", "|---|---|---|---|---|---|",
    ...snaps.map((s, i) => `| ${s.label} | ${s.kind} | ${files[i]} | ${s.snap?.estimates.length ?? 0} | ${s.hash ?? "(draft)"} | ${(s.caption ?? "").replace(/\|/g, "\\|").replace(/\n/g, " ")} |`), "",
    "Each CSV has one row per estimate: parameters, mean and error at full precision (and in concise notation), tau_int, the",
    "thermalisation cut, the analysis version, and the run (or, for a point estimate, the run estimates it combined).", "",
    "## Files", "",
    "- `provenance.prov.json`: W3C PROV-JSON: which person, sampler version, seed and run produced every estimate.",
    "- `archive/<run>/<path>`: the archived files the estimates were computed from (run manifest, series, progress).",
    "- `manifest.json`: every file with its sha256, size and what it is; `included: false` marks an archived file left out of the zip.",
    "- `SHA256SUMS`: the same hashes in the format of `sha256sum`.", "",
    "## Checking this bundle without Ergodex", "",
    "1. Unzip, then in the unzipped folder run `sha256sum -c SHA256SUMS` (GNU coreutils; on macOS `shasum -a 256 -c SHA256SUMS`).",
    "   Every line must say OK. SHA256SUMS covers every file except itself, README.md's own hash is in it, and manifest.json lists the same hashes.",
    "2. The archived files' hashes are the ones recorded when the runs were imported, not recomputed for this export: a file changed",
    "   in the archive since then fails step 1.",
    "3. To recompute a number, read the series file of each run under `archive/` (CSV: `sweep,<observable>,…`; f64le: little-endian float64,",
    "   row-major), drop the first `therm_cut` rows and apply the method named in the CSV.", "",
    left.length ? `${left.length} archived file(s) exceed the bundle's size limit (${BUNDLE_ARCHIVE_LIMIT / 1024 / 1024} MiB) and are listed in manifest.json but not included.` : "All archived files beneath the exhibits are included.", "",
  ].join("\n");
}
