// Media types of the files a result bundle holds, by file name.
import path from "node:path";

const BY_EXTENSION: Record<string, string> = {
  ".json": "application/json",
  ".csv": "text/csv",
  ".txt": "text/plain",
  ".log": "text/plain",
  // Raw little-endian float64 has no registered type; the parameter says how to read it.
  ".f64le": "application/octet-stream; format=f64le",
};

/** The media type recorded for an archived file named `name` (octet-stream when unknown). */
export function mediaTypeOf(name: string): string {
  return BY_EXTENSION[path.extname(name).toLowerCase()] ?? "application/octet-stream";
}
