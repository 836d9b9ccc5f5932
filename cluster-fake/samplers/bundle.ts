/** Result-bundle helpers: atomic JSON writes, file hashes, the sampler's source hash, the manifest. */
import crypto from "node:crypto";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { SAMPLER_CATALOG, type SamplerName } from "../../lib/samplers/schemas";
import type { Encoding } from "./series-writer";

const here = path.dirname(fileURLToPath(import.meta.url));
const repoRoot = path.resolve(here, "../..");

/** Write JSON via a temporary file and rename, so readers never see half a file. */
export function writeJsonAtomic(file: string, value: unknown): void {
  const tmp = `${file}.tmp-${process.pid}`;
  fs.writeFileSync(tmp, JSON.stringify(value, null, 2) + "\n");
  fs.renameSync(tmp, file);
}

/** sha256 (hex) and size of a file, read in chunks. */
export function hashFile(file: string): { sha256: string; bytes: number } {
  const h = crypto.createHash("sha256");
  const fd = fs.openSync(file, "r");
  const buf = Buffer.alloc(1 << 20);
  let bytes = 0;
  try {
    for (;;) {
      const n = fs.readSync(fd, buf, 0, buf.length, bytes);
      if (n === 0) break;
      h.update(buf.subarray(0, n));
      bytes += n;
    }
  } finally {
    fs.closeSync(fd);
  }
  return { sha256: h.digest("hex"), bytes };
}

/** sha256 of the first `bytes` bytes of a file (checks a partial series before resuming). */
export function hashPrefix(file: string, bytes: number): string {
  const h = crypto.createHash("sha256");
  const fd = fs.openSync(file, "r");
  const buf = Buffer.alloc(1 << 20);
  let pos = 0;
  try {
    while (pos < bytes) {
      const n = fs.readSync(fd, buf, 0, Math.min(buf.length, bytes - pos), pos);
      if (n === 0) throw new Error(`file ${file} is shorter than ${bytes} bytes`);
      h.update(buf.subarray(0, n));
      pos += n;
    }
  } finally {
    fs.closeSync(fd);
  }
  return h.digest("hex");
}

let cachedSourceHash: string | undefined;

/**
 * The manifest's sampler.commit: a content hash of the sampler sources
 * (cluster-fake/samplers/*.{ts,mjs} and lib/samplers/*.ts, sorted by path), so it is the same on
 * every checkout of the same code and needs no git on the cluster: "sha256:<hex>".
 */
export function samplerSourceHash(): string {
  if (cachedSourceHash) return cachedSourceHash;
  const h = crypto.createHash("sha256");
  const files = ["cluster-fake/samplers", "lib/samplers"].flatMap((dir) =>
    fs
      .readdirSync(path.join(repoRoot, dir))
      .filter((f) => f.endsWith(".ts") || f.endsWith(".mjs"))
      .map((f) => `${dir}/${f}`),
  );
  for (const rel of files.sort()) {
    h.update(rel + "\0");
    h.update(fs.readFileSync(path.join(repoRoot, rel)));
    h.update("\0");
  }
  cachedSourceHash = `sha256:${h.digest("hex")}`;
  return cachedSourceHash;
}

/** What the driver knows when it writes the manifest. */
export interface ManifestInput {
  runId: string;
  sampler: SamplerName;
  params: Record<string, unknown>;
  seed: string;
  startedAt: string;
  finishedAt: string;
  series: { file: string; encoding: Encoding; rows: number };
  /** Bundle files besides the manifest, relative to outdir. */
  files: string[];
}

/** Write manifest.json (DESIGN.md "Result bundle") into outdir, hashing every listed file. */
export function writeManifest(outdir: string, m: ManifestInput): void {
  const info = SAMPLER_CATALOG[m.sampler];
  writeJsonAtomic(path.join(outdir, "manifest.json"), {
    format: "ergodex.result/1",
    runId: m.runId,
    sampler: { name: info.name, version: info.version, commit: samplerSourceHash() },
    params: m.params,
    seed: m.seed,
    startedAt: m.startedAt,
    finishedAt: m.finishedAt,
    host: os.hostname(),
    exitStatus: 0,
    observables: info.observables.map((o) => ({ name: o.name, description: o.description })),
    series: m.series,
    files: m.files.map((rel) => ({ path: rel, ...hashFile(path.join(outdir, rel)) })),
  });
}
