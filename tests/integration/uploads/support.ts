// Uploads for the upload tests: good bundles from the real sampler CLI, archives built here (yazl, tar-stream), counts.
import crypto from "node:crypto";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import zlib from "node:zlib";
import tar from "tar-stream";
import yazl from "yazl";
import { db, type Run } from "@/models";
import { createApiToken } from "@/lib/auth/tokens";
import { DEMO_PEOPLE } from "@/lib/seed/demo-scenario";
import type { UploadLimits } from "@/lib/uploads/limits";
import { sampleBundle, tempDir } from "../importer/bundles";

export const ISING = { L: 8, T: 2.3, algorithm: "metropolis" };

/** A good ising2d bundle from the sampler CLI, as a run done elsewhere (its own run id and seed). */
export function goodBundle(seed: string, params: Record<string, unknown> = ISING, measurements = 200): string {
  const foreign = { id: crypto.randomUUID(), seed } as Run;
  return sampleBundle(foreign, params, { measurements });
}

/** Small limits for tests, with their own receiving folder. */
export function testLimits(over: Partial<UploadLimits> = {}): UploadLimits {
  return { maxBytes: 1_048_576, maxFiles: 20, maxUnpackedBytes: 4 * 1_048_576, maxRatio: 50, dir: tempDir("ergodex-uploads-"), ...over };
}

/** Every file of `dir` as [relative name, bytes], for building archives. */
export function filesOf(dir: string, prefix = ""): [string, Buffer][] {
  return fs.readdirSync(dir).sort().map((n) => [prefix + n, fs.readFileSync(path.join(dir, n))] as [string, Buffer]);
}

type ZipItem = [name: string, data: Buffer, mode?: number];

/** A zip (yazl, deflated) of the given entries. */
export function zipOf(items: ZipItem[]): Promise<Buffer> {
  const zip = new yazl.ZipFile();
  for (const [name, data, mode] of items) zip.addBuffer(data, name, mode ? { mode } : {});
  zip.end();
  return new Promise((resolve, reject) => {
    const chunks: Buffer[] = [];
    zip.outputStream.on("data", (c: Buffer) => chunks.push(c)).on("end", () => resolve(Buffer.concat(chunks))).on("error", reject);
  });
}

/**
 * Rename an entry inside finished zip bytes (local header and central directory). yazl refuses
 * unsafe names, so a hostile name is written as a placeholder of the same length and swapped here.
 */
export function renameInZip(zip: Buffer, from: string, to: string): Buffer {
  if (from.length !== to.length) throw new Error("names must have the same length");
  const out = Buffer.from(zip);
  const a = Buffer.from(from), b = Buffer.from(to);
  let at = 0, n = 0;
  while ((at = out.indexOf(a, at)) !== -1) { b.copy(out, at); at += a.length; n++; }
  if (n < 2) throw new Error(`${from} found ${n} times`);
  return out;
}

type TarItem = { name: string; data?: Buffer; type?: "file" | "symlink" | "link" | "directory"; linkname?: string };

/** A tar (gzip-compressed unless `gzip` is false) of the given entries, through tar-stream. */
export async function tarOf(items: TarItem[], gzip = true): Promise<Buffer> {
  const pack = tar.pack();
  const chunks: Buffer[] = [];
  const done = new Promise<void>((resolve, reject) => { pack.on("data", (c: unknown) => { chunks.push(c as Buffer); }).on("end", resolve).on("error", reject); });
  for (const it of items) {
    await new Promise<void>((resolve, reject) => pack.entry({ name: it.name, type: it.type ?? "file", linkname: it.linkname, size: it.data?.length ?? 0 }, it.data ?? Buffer.alloc(0), (err) => (err ? reject(err) : resolve())));
  }
  pack.finalize();
  await done;
  const raw = Buffer.concat(chunks);
  return gzip ? zlib.gzipSync(raw) : raw;
}

/** A raw-body upload request. */
export const rawRequest = (body: Buffer, type = "application/zip", name?: string) =>
  new Request("http://127.0.0.1/api/v1/imports", { method: "POST", body: new Uint8Array(body), headers: { "content-type": type, ...(name ? { "x-file-name": name } : {}) } });

/** A multipart upload of named files (names may be relative paths). */
export function formRequest(files: [string, Buffer][]): Request {
  const form = new FormData();
  for (const [name, data] of files) form.append("file", new Blob([new Uint8Array(data)]), name);
  return new Request("http://127.0.0.1/api/v1/imports", { method: "POST", body: form });
}

/** Row counts an upload could change. */
export async function uploadCounts(): Promise<Record<string, number>> {
  const [rows] = (await db().sequelize.query(`SELECT
      (SELECT count(*) FROM ensembles)::int AS ensembles, (SELECT count(*) FROM parameter_points)::int AS points,
      (SELECT count(*) FROM runs)::int AS runs, (SELECT count(*) FROM run_events)::int AS run_events,
      (SELECT count(*) FROM series)::int AS series, (SELECT count(*) FROM estimates)::int AS estimates,
      (SELECT count(*) FROM run_artifacts)::int AS run_artifacts,
      (SELECT count(*) FROM imports WHERE state = 'accepted')::int AS accepted`)) as [Record<string, number>[], unknown];
  return rows[0];
}

/** Entries left in a receiving folder (should be none once an upload is answered). */
export const leftovers = (dir: string) => (fs.existsSync(dir) ? fs.readdirSync(dir) : []);

export const tmp = () => fs.mkdtempSync(path.join(os.tmpdir(), "ergodex-up-"));

/** A random seed for a fresh bundle (uploads are recognised by hash, so each test wants its own). */
export const randomSeed = () => String(crypto.randomInt(1, 2 ** 47));

/** A one-day API token for the demo person with `role`, labelled so the test that made it is known. */
export async function demoToken(role: "researcher" | "viewer", label: string): Promise<string> {
  const user = (await db().User.findOne({ where: { email: DEMO_PEOPLE.find((p) => p.role === role)!.email } }))!;
  return (await createApiToken({ actorId: user.id, ip: null, requestId: null }, user.id, `${label} ${randomSeed()}`, 1)).token;
}
