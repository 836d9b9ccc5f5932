import "server-only";
// Unpack a .zip safely: own path checks, no links, declared and actual sizes bounded, ratio bounded.
import fs from "node:fs";
import path from "node:path";
import { pipeline } from "node:stream/promises";
import yauzl, { type Entry, type ZipFile } from "yauzl";
import { AppError } from "@/lib/errors";
import type { UnpackBudget } from "./budget";
import { RATIO_FLOOR_BYTES } from "./limits";
import { safeEntryPath } from "./safe-path";

const S_IFMT = 0o170000;
const S_IFREG = 0o100000;
const S_IFDIR = 0o040000;

const openZip = (file: string) => new Promise<ZipFile>((resolve, reject) =>
  // decodeStrings off: yauzl's own name checks would throw its messages; ours name the entry and the rule.
  yauzl.open(file, { lazyEntries: true, decodeStrings: false, validateEntrySizes: true, autoClose: false }, (err, zip) => (err ? reject(err) : resolve(zip!))));

const openEntry = (zip: ZipFile, entry: Entry) => new Promise<NodeJS.ReadableStream>((resolve, reject) =>
  zip.openReadStream(entry, (err, stream) => (err ? reject(err) : resolve(stream!))));

/** Entry name: UTF-8 when the entry says so (general purpose bit 11), else bytes read as Latin-1. */
function nameOf(entry: Entry): string {
  const raw = entry.fileName as unknown as Buffer;
  return (entry.generalPurposeBitFlag & 0x800) !== 0 ? raw.toString("utf8") : raw.toString("latin1");
}

/** Unpack zip `file` (shown to the user as `label`) into the empty folder `target`. */
export async function unpackZip(file: string, label: string, target: string, budget: UnpackBudget): Promise<void> {
  let zip: ZipFile;
  try {
    zip = await openZip(file);
  } catch (err) {
    throw new AppError("invalid", `${label}: is not a readable zip archive (${(err as Error).message})`, { file: label });
  }
  const compressedTotal = fs.statSync(file).size;
  let declaredTotal = 0;
  try {
    await new Promise<void>((resolve, reject) => {
      zip.on("error", reject);
      zip.on("end", () => resolve());
      zip.on("entry", (entry: Entry) => {
        handle(entry).then(() => zip.readEntry(), reject);
      });
      zip.readEntry();
    });
  } catch (err) {
    if (err instanceof AppError) throw err;
    throw new AppError("invalid", `${label}: is a damaged zip archive (${(err as Error).message})`, { file: label });
  } finally {
    zip.close();
  }

  async function handle(entry: Entry): Promise<void> {
    const name = nameOf(entry);
    const where = `${label}: ${name}`;
    const rel = safeEntryPath(target, name, label);
    const mode = (entry.externalFileAttributes >>> 16) & S_IFMT;
    const isDir = name.endsWith("/") || mode === S_IFDIR;
    // Unix "version made by" (high byte 3) carries a mode; anything but a plain file or folder (a link, a device) is refused.
    if ((entry.versionMadeBy >> 8) === 3 && mode !== 0 && mode !== S_IFREG && mode !== S_IFDIR) {
      throw new AppError("invalid", `${where}: is ${mode === 0o120000 ? "a symbolic link" : "a special file"}; uploads may hold only plain files and folders`, { file: label, entry: name });
    }
    if (entry.isEncrypted()) throw new AppError("invalid", `${where}: is encrypted; upload unencrypted archives`, { file: label, entry: name });
    if (isDir) {
      fs.mkdirSync(path.join(target, rel), { recursive: true });
      return;
    }
    budget.addFile(where);
    declaredTotal += entry.uncompressedSize;
    const ratio = entry.uncompressedSize / Math.max(1, entry.compressedSize);
    if (entry.uncompressedSize > RATIO_FLOOR_BYTES && ratio > budget.limits.maxRatio) {
      throw new AppError("invalid", `${where}: compresses ${Math.round(ratio)}:1 (${entry.compressedSize} → ${entry.uncompressedSize} bytes), beyond the ${budget.limits.maxRatio}:1 allowed — refused as a possible zip bomb`, { file: label, entry: name });
    }
    if (declaredTotal > RATIO_FLOOR_BYTES && declaredTotal / Math.max(1, compressedTotal) > budget.limits.maxRatio) {
      throw new AppError("invalid", `${label}: unpacks to ${declaredTotal} bytes from ${compressedTotal}, beyond the ${budget.limits.maxRatio}:1 allowed — refused as a possible zip bomb`, { file: label });
    }
    budget.declare(entry.uncompressedSize, where);
    const out = path.join(target, rel);
    if (fs.existsSync(out)) throw new AppError("invalid", `${where}: appears twice in the archive`, { file: label, entry: name });
    fs.mkdirSync(path.dirname(out), { recursive: true });
    const stream = await openEntry(zip, entry);
    await pipeline(stream, budget.meter(where, entry.uncompressedSize), fs.createWriteStream(out, { flags: "wx" }));
  }
}
