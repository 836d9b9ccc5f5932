// Where a content-addressed file lives: <archiveDir>/ab/cd/<sha256>, two levels of fan-out.
import path from "node:path";
import { env } from "@/lib/env";

const SHA256 = /^[0-9a-f]{64}$/;

/**
 * The archive-relative path of the file with this sha256 ("ab/cd/abcd…"). Two levels of 256
 * folders keep every folder small even at millions of files.
 */
export function storagePathOf(sha256: string): string {
  if (!SHA256.test(sha256)) throw new Error(`not a lower-case hex sha256: ${JSON.stringify(sha256)}`);
  return path.posix.join(sha256.slice(0, 2), sha256.slice(2, 4), sha256);
}

/** Absolute path of an archived file from its storagePath (as stored on the Artifact row). */
export function resolveArchived(storagePath: string, archiveDir: string = env.archiveDir): string {
  const full = path.resolve(archiveDir, storagePath);
  if (!full.startsWith(path.resolve(archiveDir) + path.sep)) throw new Error(`storage path escapes the archive: ${storagePath}`);
  return full;
}
