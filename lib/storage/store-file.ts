// Copy a file into the content-addressed archive on disk: hashed while copied, placed by rename.
import crypto from "node:crypto";
import fs from "node:fs";
import path from "node:path";
import { pipeline } from "node:stream/promises";
import { Transform } from "node:stream";
import { env } from "@/lib/env";
import { storagePathOf } from "./archive-path";
import type { FileDigest } from "./hash-file";

/** Where a file ended up in the archive. */
export type StoredFile = FileDigest & { storagePath: string };

/** Options of {@link storeFile}. */
export type StoreOptions = {
  archiveDir?: string;
  /** Refuse the file unless its content has this sha256 (it was checked earlier; this closes the gap). */
  expectSha256?: string;
};

/**
 * Copy `source` into the archive under its sha256. The copy goes to a temporary file in the
 * target folder and is renamed into place after fsync, so a reader never sees half a file and a
 * crash leaves at most a stray temporary. A file already archived is left as it is (same hash,
 * same content), which makes storing idempotent and concurrent stores of one file harmless.
 */
export async function storeFile(source: string, options: StoreOptions = {}): Promise<StoredFile> {
  const archiveDir = options.archiveDir ?? env.archiveDir;
  const staging = path.join(archiveDir, "tmp");
  fs.mkdirSync(staging, { recursive: true });
  const temp = path.join(staging, `${process.pid}-${crypto.randomBytes(8).toString("hex")}`);
  const hash = crypto.createHash("sha256");
  let bytes = 0;
  try {
    const tap = new Transform({
      transform(piece: Buffer, _enc, done) {
        hash.update(piece);
        bytes += piece.length;
        done(null, piece);
      },
    });
    const out = fs.createWriteStream(temp, { flags: "wx", mode: 0o444 });
    await pipeline(fs.createReadStream(source, { highWaterMark: 1 << 20 }), tap, out);
    const sha256 = hash.digest("hex");
    if (options.expectSha256 && options.expectSha256 !== sha256) {
      throw new Error(`${source} changed while being archived: sha256 ${sha256}, expected ${options.expectSha256}`);
    }
    const storagePath = storagePathOf(sha256);
    const target = path.join(archiveDir, storagePath);
    if (fs.existsSync(target) && fs.statSync(target).size === bytes) return { sha256, bytes, storagePath };
    const fd = fs.openSync(temp, "r");
    try { fs.fsyncSync(fd); } finally { fs.closeSync(fd); }
    fs.mkdirSync(path.dirname(target), { recursive: true });
    fs.renameSync(temp, target);
    return { sha256, bytes, storagePath };
  } finally {
    fs.rmSync(temp, { force: true });
  }
}
