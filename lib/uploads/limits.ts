// The limits one upload is held to (env.uploads), passed explicitly so tests can shrink them.
import { env } from "@/lib/env";

/** Bounds of one upload: body size, file count, unpacked bytes, compression ratio, and where it is received. */
export type UploadLimits = { maxBytes: number; maxFiles: number; maxUnpackedBytes: number; maxRatio: number; dir: string };

/** The configured limits. */
export function uploadLimits(): UploadLimits {
  return { ...env.uploads };
}

/** Bytes as a person reads them: 256 MiB. */
export function formatBytes(n: number): string {
  const units = ["bytes", "KiB", "MiB", "GiB", "TiB"];
  let i = 0;
  let v = n;
  while (v >= 1024 && i < units.length - 1) { v /= 1024; i++; }
  return i === 0 ? `${n} bytes` : `${Number.isInteger(v) ? v : v.toFixed(1)} ${units[i]}`;
}

/** Ratio above which an archive counts as a zip bomb, unless it unpacks to less than this. */
export const RATIO_FLOOR_BYTES = 1_048_576;
