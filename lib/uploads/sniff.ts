// What kind of file an upload is, from its first bytes (names and content types can lie).
import fs from "node:fs";

/** Archive kinds we unpack; "other" is a plain file. */
export type FileKind = "zip" | "gzip" | "tar" | "other";

/** The kind of `file` by magic number: PK\x03\x04 / PK\x05\x06 (zip), 1f 8b (gzip), "ustar" at 257 (tar). */
export function sniffKind(file: string): FileKind {
  const fd = fs.openSync(file, "r");
  try {
    const head = Buffer.alloc(262);
    const n = fs.readSync(fd, head, 0, head.length, 0);
    if (n >= 4 && head[0] === 0x50 && head[1] === 0x4b && ((head[2] === 3 && head[3] === 4) || (head[2] === 5 && head[3] === 6))) return "zip";
    if (n >= 2 && head[0] === 0x1f && head[1] === 0x8b) return "gzip";
    if (n >= 262 && head.subarray(257, 262).toString("latin1") === "ustar") return "tar";
    return "other";
  } finally {
    fs.closeSync(fd);
  }
}

/** Whether a name says "archive": .zip, .tar.gz, .tgz, .tar. */
export const looksLikeArchive = (name: string) => /\.(zip|tar\.gz|tgz|tar)$/i.test(name);
