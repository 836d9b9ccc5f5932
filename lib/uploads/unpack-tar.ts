import "server-only";
// Unpack a .tar.gz (or plain .tar) safely: own path checks, only files and folders, sizes and ratio bounded.
import fs from "node:fs";
import path from "node:path";
import { Readable } from "node:stream";
import { pipeline } from "node:stream/promises";
import zlib from "node:zlib";
import tar from "tar-stream";
import { AppError } from "@/lib/errors";
import type { UnpackBudget } from "./budget";
import { RATIO_FLOOR_BYTES } from "./limits";
import { safeEntryPath } from "./safe-path";

/** Unpack tar archive `file` (gzip-compressed when `gzipped`), shown as `label`, into the empty folder `target`. */
export async function unpackTar(file: string, label: string, target: string, budget: UnpackBudget, gzipped: boolean): Promise<void> {
  const compressed = fs.statSync(file).size;
  let inflated = 0;
  const extract = tar.extract();
  const source: Readable = fs.createReadStream(file);
  const gunzip = gzipped ? zlib.createGunzip() : null;
  const ratioRefusal = () => new AppError("invalid", `${label}: inflates to more than ${budget.limits.maxRatio}× its ${compressed} bytes — refused as a possible zip bomb`, { file: label });
  if (gunzip) {
    // Count what gzip produces before tar sees it: a bomb is stopped however its tar headers read.
    gunzip.on("data", (chunk: Buffer) => {
      inflated += chunk.length;
      if (inflated > RATIO_FLOOR_BYTES && inflated / Math.max(1, compressed) > budget.limits.maxRatio) gunzip.destroy(ratioRefusal());
      else if (inflated > budget.limits.maxUnpackedBytes + 1_048_576) gunzip.destroy(new AppError("too_large", `${label}: inflates beyond the upload's unpacked-size limit`, { file: label }));
    });
  }
  const feeding = gunzip ? pipeline(source, gunzip, extract) : pipeline(source, extract);
  feeding.catch(() => { /* surfaced through the iteration below */ });
  try {
    for await (const entry of extract) {
      const h = entry.header;
      const where = `${label}: ${h.name}`;
      const rel = safeEntryPath(target, h.name, label);
      if (h.type === "directory") {
        fs.mkdirSync(path.join(target, rel), { recursive: true });
        entry.resume();
        continue;
      }
      if (h.type === "symlink" || h.type === "link") {
        throw new AppError("invalid", `${where}: is a ${h.type === "symlink" ? "symbolic" : "hard"} link (to ${JSON.stringify(h.linkname)}); uploads may hold only plain files and folders`, { file: label, entry: h.name });
      }
      if (h.type !== "file" && h.type !== "contiguous-file") {
        throw new AppError("invalid", `${where}: is a ${h.type} entry; uploads may hold only plain files and folders`, { file: label, entry: h.name });
      }
      budget.addFile(where);
      budget.declare(h.size ?? 0, where);
      const out = path.join(target, rel);
      if (fs.existsSync(out)) throw new AppError("invalid", `${where}: appears twice in the archive`, { file: label, entry: h.name });
      fs.mkdirSync(path.dirname(out), { recursive: true });
      await pipeline(entry, budget.meter(where, h.size ?? null), fs.createWriteStream(out, { flags: "wx" }));
    }
    await feeding;
  } catch (err) {
    source.destroy();
    if (err instanceof AppError) throw err;
    throw new AppError("invalid", `${label}: is not a readable ${gzipped ? "gzip-compressed " : ""}tar archive (${(err as Error).message})`, { file: label });
  }
}
