// A corpus of malformed uploads: each refused with its own reason, and nothing of it left behind.
import fs from "node:fs";
import path from "node:path";
import zlib from "node:zlib";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { loadIdentity, type Identity } from "@/lib/auth/identity";
import { depositUpload } from "@/lib/uploads/deposit-upload";
import type { UploadLimits } from "@/lib/uploads/limits";
import { db } from "@/models";
import { makeGroup, makeUser, useTestDatabase } from "@/tests/support/db";
import { cleanupTemp, copyBundle, editCsv, editManifest, fixHashes, registerIsing } from "../importer/bundles";
import { filesOf, formRequest, goodBundle, leftovers, rawRequest, renameInZip, tarOf, testLimits, uploadCounts, zipOf } from "./support";

useTestDatabase();
afterAll(cleanupTemp);
const audit = { actorId: null, ip: null, requestId: "corpus" };
let who: Identity;
let good: string;
const limits = testLimits();

beforeAll(async () => {
  const group = await makeGroup();
  const user = await makeUser("researcher", group);
  await registerIsing();
  who = (await loadIdentity(user.id, "token"))!;
  good = goodBundle("777");
});

type Case = { name: string; reason: RegExp; make: () => Promise<Request>; limits?: Partial<UploadLimits>; whole?: string };

/** A copy of the good bundle changed by `change`, zipped. */
const zipped = async (change: (dir: string) => void) => {
  const dir = copyBundle(good);
  change(dir);
  return rawRequest(await zipOf(filesOf(dir)), "application/zip", "bundle.zip");
};
const csvEdit = (change: (lines: string[]) => void, fix = true) => zipped((d) => editCsv(d, change, fix));
const cell = (lines: string[], line: number, col: number, v: string) => { const c = lines[line - 1].split(","); c[col] = v; lines[line - 1] = c.join(","); };
const manifestEdit = (change: (m: Record<string, any>) => void) => zipped((d) => editManifest(d, change)); // eslint-disable-line @typescript-eslint/no-explicit-any

const CASES: Case[] = [
  { name: "missing manifest", reason: /manifest\.json: is missing/, make: () => zipped((d) => fs.rmSync(path.join(d, "manifest.json"))) },
  { name: "manifest not JSON", reason: /manifest\.json: is not valid JSON/, make: () => zipped((d) => fs.writeFileSync(path.join(d, "manifest.json"), "{ nope")) },
  { name: "wrong format tag", reason: /manifest\.json \/format: is "ergodex\.result\/0"/, make: () => manifestEdit((m) => { m.format = "ergodex.result/0"; }) },
  { name: "schema: rows not an integer", reason: /\/series\/rows/, make: () => manifestEdit((m) => { m.series.rows = "many"; }) },
  { name: "wrong encoding tag", reason: /\/series\/encoding/, make: () => manifestEdit((m) => { m.series.encoding = "xml"; }) },
  { name: "sampler failed", reason: /\/exitStatus: is 3/, make: () => manifestEdit((m) => { m.exitStatus = 3; }) },
  { name: "unknown sampler", reason: /\/sampler: potts3d 9\.9\.9 is not a registered sampler/, make: () => manifestEdit((m) => { m.sampler.name = "potts3d"; m.sampler.version = "9.9.9"; }) },
  { name: "unknown observable", reason: /\/observables\/0\/name: "energy" is not an observable of ising2d/, make: () => zipped((d) => { editManifest(d, (m) => { m.observables[0].name = "energy"; }); editCsv(d, (l) => { l[0] = l[0].replace("sweep,e,", "sweep,energy,"); }); }) },
  { name: "hash mismatch", reason: /series\.csv: sha256 is [0-9a-f]{64} but manifest\.json \/files\/\d+\/sha256 says/, make: () => csvEdit((l) => { l[2] = l[2].slice(0, -1) + (l[2].endsWith("1") ? "2" : "1"); }, false) }, // same size, other bytes
  { name: "size mismatch", reason: /series\.csv: is \d+ bytes but manifest\.json \/files\/\d+\/bytes says/, make: () => csvEdit((l) => { l.pop(); }, false) },
  { name: "listed file missing", reason: /series\.csv: is listed in manifest\.json .* but missing/, make: () => zipped((d) => fs.rmSync(path.join(d, "series.csv"))) },
  { name: "truncated series (rows fewer than the manifest says)", reason: /series\.csv: has 150 data rows, manifest\.json \/series\/rows says 200/, make: () => csvEdit((l) => { l.splice(151); }) },
  { name: "series cut off mid-row", reason: /does not end with a newline/, make: () => zipped((d) => { const f = path.join(d, "series.csv"); const t = fs.readFileSync(f, "utf8"); fs.writeFileSync(f, t.slice(0, t.length - 4)); fixHashes(d); }) },
  { name: "NaN", reason: /series\.csv line 10 column "e": "NaN" is not finite/, make: () => csvEdit((l) => cell(l, 10, 1, "NaN")) },
  { name: "Infinity", reason: /series\.csv line 11 column "absM": "Infinity" is not finite/, make: () => csvEdit((l) => cell(l, 11, 2, "Infinity")) },
  { name: "-Infinity", reason: /line 12 column "m2": "-Infinity" is not finite/, make: () => csvEdit((l) => cell(l, 12, 3, "-Infinity")) },
  { name: "overflowing number", reason: /"1e999" overflows a float64/, make: () => csvEdit((l) => cell(l, 13, 4, "1e999")) },
  { name: "not a number", reason: /"0x1F" is not a decimal number/, make: () => csvEdit((l) => cell(l, 14, 1, "0x1F")) },
  { name: "duplicate sweeps", reason: /sweep \d+ repeats the sweep of line 20 \(duplicate measurement\)/, make: () => csvEdit((l) => cell(l, 21, 0, l[19].split(",")[0])) },
  { name: "non-monotonic sweeps", reason: /sweeps must increase strictly/, make: () => csvEdit((l) => { const a = l[29]; l[29] = l[30]; l[30] = a; }) },
  { name: "wrong header", reason: /header must be "sweep,e,absM,m2,m4"/, make: () => csvEdit((l) => { l[0] = "sweep,absM,e,m2,m4"; }) },
  { name: "missing column", reason: /line 40: has 4 columns, the header has 5/, make: () => csvEdit((l) => { l[39] = l[39].split(",").slice(0, 4).join(","); }) },
  { name: "wrong encoding (UTF-16, not UTF-8 csv)", reason: /series\.csv line 1: header must be/, make: () => zipped((d) => { const f = path.join(d, "series.csv"); fs.writeFileSync(f, Buffer.from("\ufeff" + fs.readFileSync(f, "utf8"), "utf16le")); fixHashes(d); }) },
  { name: "0-byte series file", reason: /series\.csv: manifest\.json \/series\/rows says 200 rows, but 0 bytes cannot hold/, make: () => zipped((d) => { fs.writeFileSync(path.join(d, "series.csv"), ""); fixHashes(d); }) },
  { name: "0-byte archive", reason: /empty\.zip: is empty \(0 bytes\)/, make: async () => formRequest([["empty.zip", Buffer.alloc(0)]]) },
  { name: "not an archive", reason: /notes\.txt: is not a \.zip or \.tar\.gz archive/, make: async () => rawRequest(Buffer.from("just some text\n"), "application/octet-stream", "notes.txt") },
  { name: "named .zip but is not one", reason: /fake\.zip: is not a \.zip or \.tar\.gz archive/, make: async () => formRequest([["fake.zip", Buffer.from("PK? not really")]]) },
  { name: "damaged zip", reason: /cut\.zip: is (not a readable|a damaged) zip archive/, make: async () => { const z = await zipOf(filesOf(good)); return rawRequest(z.subarray(0, z.length - 30), "application/zip", "cut.zip"); } },
  { name: "gzip that is not a tar", reason: /notatar\.tar\.gz: is not a readable gzip-compressed tar archive/, make: async () => rawRequest(zlib.gzipSync(Buffer.from("hello ".repeat(200))), "application/gzip", "notatar.tar.gz") },
  { name: "zip with ../ path", reason: /entry "\.\.\/evil\.txt" contains '\.\.'/, make: async () => rawRequest(renameInZip(await zipOf([...filesOf(good), ["xx/evil.txt", Buffer.from("x")]]), "xx/evil.txt", "../evil.txt"), "application/zip", "dots.zip") },
  { name: "zip with an absolute path", reason: /entry "\/tmp\/evil\.txt" is an absolute path/, make: async () => rawRequest(renameInZip(await zipOf([...filesOf(good), ["xtmp/evil.txt", Buffer.from("x")]]), "xtmp/evil.txt", "/tmp/evil.txt"), "application/zip", "abs.zip") },
  { name: "symlink in a zip", reason: /link\.zip: passwd: is a symbolic link/, make: async () => rawRequest(await zipOf([...filesOf(good), ["passwd", Buffer.from("/etc/passwd"), 0o120777]]), "application/zip", "link.zip") },
  { name: "zip bomb (ratio)", reason: /bomb\.zip: zeros\.bin: compresses \d+:1 .* possible zip bomb/, make: async () => rawRequest(await zipOf([...filesOf(good), ["zeros.bin", Buffer.alloc(64 * 1_048_576)]]), "application/zip", "bomb.zip") },
  { name: "unpacks beyond the size limit", reason: /big\.zip: .*declares 5 MiB, more than the 4 MiB an upload may unpack to/, limits: { maxRatio: 100_000 }, make: async () => rawRequest(await zipOf([["big.bin", Buffer.alloc(5 * 1_048_576)]]), "application/zip", "big.zip") },
  { name: "symlink in a tar", reason: /link\.tar\.gz: b\/series\.csv: is a symbolic link \(to "\/etc\/passwd"\)/, make: async () => rawRequest(await tarOf([{ name: "b/manifest.json", data: fs.readFileSync(path.join(good, "manifest.json")) }, { name: "b/series.csv", type: "symlink", linkname: "/etc/passwd" }]), "application/gzip", "link.tar.gz") },
  { name: "hard link in a tar", reason: /hard\.tar\.gz: b\/x: is a hard link/, make: async () => rawRequest(await tarOf([{ name: "b/x", type: "link", linkname: "b/manifest.json" }]), "application/gzip", "hard.tar.gz") },
  { name: "tar with ../ path", reason: /dots\.tar\.gz: entry "\.\.\/\.\.\/x" contains '\.\.'/, make: async () => rawRequest(await tarOf([{ name: "../../x", data: Buffer.from("x") }]), "application/gzip", "dots.tar.gz") },
  { name: "tar with an absolute path", reason: /abs\.tar\.gz: entry "\/etc\/cron\.d\/x" is an absolute path/, make: async () => rawRequest(await tarOf([{ name: "/etc/cron.d/x", data: Buffer.from("x") }]), "application/gzip", "abs.tar.gz") },
  { name: "too many files", reason: /many\.zip: f20\.txt: the upload holds more than 20 files/, make: async () => rawRequest(await zipOf(Array.from({ length: 25 }, (_, i) => [`f${String(i).padStart(2, "0")}.txt`, Buffer.from("x")] as [string, Buffer])), "application/zip", "many.zip") },
  { name: "oversize upload", whole: "too_large", reason: /larger than 1 MiB, the limit per upload/, make: async () => rawRequest(Buffer.alloc(1_048_576 + 10, 7), "application/zip", "huge.zip") },
  { name: "empty upload", whole: "invalid", reason: /the upload is empty/, make: async () => rawRequest(Buffer.alloc(0), "application/zip") },
  { name: "multipart file name escaping the folder", whole: "invalid", reason: /entry "\.\.\/manifest\.json" contains '\.\.'/, make: async () => formRequest([["../manifest.json", Buffer.from("{}")]]) },
];

describe("malformed uploads are refused with their own reason, and leave nothing behind", () => {
  it("the corpus has at least 30 cases with distinct reasons", () => {
    expect(CASES.length).toBeGreaterThanOrEqual(30);
    expect(new Set(CASES.map((c) => c.reason.source)).size).toBe(CASES.length);
  });

  const seen = new Map<string, string>();
  for (const c of CASES) {
    it(c.name, async () => {
      const lim = { ...limits, ...c.limits };
      const before = await uploadCounts();
      const res = await depositUpload(await c.make(), who, audit, lim).then((r) => ({ r, err: null }), (err) => ({ r: null, err }));
      let reason: string;
      if (c.whole) {
        expect(res.err, "the upload should be refused as a whole").not.toBeNull();
        expect(res.err.code).toBe(c.whole);
        reason = res.err.message;
      } else {
        expect(res.err, String(res.err?.stack)).toBeNull();
        expect(res.r!.bundles.length).toBeGreaterThan(0);
        for (const b of res.r!.bundles) expect(b.status, JSON.stringify(b)).toBe("refused");
        reason = res.r!.bundles.map((b) => (b as { reason: string }).reason).join(" | ");
        for (const b of res.r!.bundles) {
          const id = (b as { importId: string | null }).importId;
          if (id) expect(await db().Import.findByPk(id)).toMatchObject({ state: "rejected", runId: null, source: "upload", uploadedById: who.userId });
        }
      }
      expect(reason).toMatch(c.reason);
      expect([...seen.entries()].find(([, r]) => r === reason)?.[0], "another case gave the same reason").toBeUndefined();
      seen.set(c.name, reason);
      expect(await uploadCounts()).toEqual(before);
      expect(leftovers(lim.dir)).toEqual([]);
    });
  }

  it("after all refusals, the good bundle itself is still accepted (the corpus was refused for its defects)", async () => {
    const res = await depositUpload(rawRequest(await zipOf(filesOf(good)), "application/zip", "good.zip"), who, audit, limits);
    expect(res.bundles.map((b) => b.status)).toEqual(["accepted"]);
  });
});
