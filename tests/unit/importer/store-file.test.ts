// The content-addressed store on disk: path by sha256, idempotent, no temporaries left, altered content refused.
import crypto from "node:crypto";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { resolveArchived, storagePathOf } from "@/lib/storage/archive-path";
import { storeFile } from "@/lib/storage/store-file";
import { checkManifest, isSafeBundlePath } from "@/lib/importer/check-manifest";
import { mediaTypeOf } from "@/lib/storage/media-type";

const root = fs.mkdtempSync(path.join(os.tmpdir(), "ergodex-store-"));
afterAll(() => fs.rmSync(root, { recursive: true, force: true }));
const archiveDir = path.join(root, "archive");

describe("storeFile", () => {
  it("stores under ab/cd/<sha256>, the same content once, leaving no temporaries", async () => {
    const src = path.join(root, "a.csv");
    fs.writeFileSync(src, "sweep,e\n1,-1.5\n");
    const sha = crypto.createHash("sha256").update(fs.readFileSync(src)).digest("hex");
    const first = await storeFile(src, { archiveDir });
    const again = await storeFile(src, { archiveDir });
    expect(first).toEqual({ sha256: sha, bytes: 15, storagePath: `${sha.slice(0, 2)}/${sha.slice(2, 4)}/${sha}` });
    expect(again).toEqual(first);
    expect(fs.readFileSync(resolveArchived(first.storagePath, archiveDir), "utf8")).toBe("sweep,e\n1,-1.5\n");
    expect(fs.readdirSync(path.join(archiveDir, "tmp"))).toEqual([]);
  });

  it("refuses content whose hash is not the expected one", async () => {
    const src = path.join(root, "b.csv");
    fs.writeFileSync(src, "changed");
    await expect(storeFile(src, { archiveDir, expectSha256: "0".repeat(64) })).rejects.toThrow(/changed while being archived/);
    expect(fs.readdirSync(path.join(archiveDir, "tmp"))).toEqual([]);
  });

  it("keeps storage paths inside the archive", () => {
    expect(() => storagePathOf("../etc")).toThrow(/not a lower-case hex sha256/);
    expect(() => resolveArchived("../../etc/passwd", archiveDir)).toThrow(/escapes the archive/);
  });
});

describe("bundle paths and media types", () => {
  it("accepts plain relative paths only", () => {
    for (const ok of ["series.csv", "spectrum.csv", "out/extra_1.json"]) expect(isSafeBundlePath(ok), ok).toBe(true);
    for (const bad of ["../x", "/etc/passwd", "a/../b", "./a", "a//b", ".hidden", "a\\b", "a b", ""]) expect(isSafeBundlePath(bad), bad).toBe(false);
  });

  it("refuses a manifest listing itself or a file twice", () => {
    const base = {
      format: "ergodex.result/1", runId: "r", sampler: { name: "ising2d", version: "1.0.0" }, params: {}, seed: "1", startedAt: "", finishedAt: "", host: "h", exitStatus: 0,
      observables: [{ name: "e" }], series: { file: "series.csv", encoding: "csv" as const, rows: 1 },
    };
    const file = { path: "series.csv", sha256: "0".repeat(64), bytes: 1 };
    expect(() => checkManifest({ ...base, files: [file, file] })).toThrow(/\/files\/1\/path: "series.csv" is listed twice/);
    expect(() => checkManifest({ ...base, files: [file, { ...file, path: "manifest.json" }] })).toThrow(/cannot list itself/);
    expect(() => checkManifest({ ...base, observables: [{ name: "e" }, { name: "e" }], files: [file] })).toThrow(/\/observables\/1\/name: observable "e" is listed twice/);
    expect(() => checkManifest({ ...base, observables: [{ name: "sweep" }], files: [file] })).toThrow(/"sweep" is the series' first column/);
  });

  it("names media types by extension", () => {
    expect([mediaTypeOf("series.csv"), mediaTypeOf("manifest.json"), mediaTypeOf("series.f64le"), mediaTypeOf("blob")])
      .toEqual(["text/csv", "application/json", "application/octet-stream; format=f64le", "application/octet-stream"]);
  });
});
