// sha256 and size of a file, streamed so that large series never sit in memory twice.
import crypto from "node:crypto";
import fs from "node:fs";

/** A file's content hash (lower-case hex) and byte length. */
export type FileDigest = { sha256: string; bytes: number };

/** sha256 and byte count of the file at `file`, read in 1 MiB pieces. */
export async function hashFile(file: string): Promise<FileDigest> {
  const hash = crypto.createHash("sha256");
  let bytes = 0;
  for await (const piece of fs.createReadStream(file, { highWaterMark: 1 << 20 })) {
    hash.update(piece as Buffer);
    bytes += (piece as Buffer).length;
  }
  return { sha256: hash.digest("hex"), bytes };
}
