// Names inside an upload become paths on our disk only through this check.
import path from "node:path";
import { AppError } from "@/lib/errors";

/**
 * The relative path an archive entry (or a multipart file name) may be written to under `root`,
 * or an AppError("invalid") naming the entry: no absolute paths (POSIX, Windows drive or UNC),
 * no backslashes, no NUL, no `..` segment, nothing that resolves outside `root`.
 */
export function safeEntryPath(root: string, name: string, where: string): string {
  const refuse = (why: string) => new AppError("invalid", `${where}: entry ${JSON.stringify(name)} ${why}`, { file: where, entry: name });
  if (name.length === 0) throw refuse("has an empty name");
  if (name.includes("\0")) throw refuse("contains a NUL byte");
  if (name.includes("\\")) throw refuse("contains a backslash (not a portable path)");
  if (name.startsWith("/") || /^[A-Za-z]:/.test(name)) throw refuse("is an absolute path; only paths relative to the archive are allowed");
  const parts = name.split("/").filter((p) => p !== "" && p !== ".");
  if (parts.includes("..")) throw refuse("contains '..': it would escape the folder it is unpacked into");
  if (parts.length === 0) throw refuse("names no file");
  const rel = parts.join("/");
  const full = path.resolve(root, rel);
  // Belt and braces: the segment check above already rules this out.
  if (!full.startsWith(path.resolve(root) + path.sep)) throw refuse("resolves outside the upload folder");
  return rel;
}
