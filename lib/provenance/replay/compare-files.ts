// Byte-for-byte comparison of an archived result file with its replayed twin, and where they part:
// the byte offset and, for a series file, the row and the sweep (the row's first column) there.
import fs from "node:fs";
import crypto from "node:crypto";

/** Where two files first differ; row and sweep are null when the file is not a series or the offset lies past a row. */
export type FirstDifference = { offset: number; row: number | null; sweep: number | null; archivedBytes: number; replayBytes: number };

/** What the comparison of one file found. */
export type FileComparison = {
  path: string;
  archivedSha256: string;
  replaySha256: string | null;
  identical: boolean;
  /** Whether the archived bytes still hash to the recorded sha256 (false: the archive was altered). */
  archiveIntact: boolean;
  /** null when identical; "missing" when the replay did not write the file. */
  difference: (FirstDifference & { kind: "bytes" }) | { kind: "missing" } | null;
};

const sha256 = (b: Buffer) => crypto.createHash("sha256").update(b).digest("hex");

/** First offset at which a and b differ (the shorter length when one is a prefix of the other), or -1. */
export function firstDifferingByte(a: Buffer, b: Buffer): number {
  const n = Math.min(a.length, b.length);
  // Buffer.compare over halves would be faster on huge files; series of a few MB are read whole anyway.
  for (let i = 0; i < n; i++) if (a[i] !== b[i]) return i;
  return a.length === b.length ? -1 : n;
}

/**
 * Row and sweep at `offset` of a series file in the archived bytes. csv: data row k (1-based) is
 * line k+1 after the header, its sweep the text before the first comma; f64le: rows of `columns`
 * float64 values, the sweep the first value of the row.
 */
export function locateRow(bytes: Buffer, offset: number, encoding: "csv" | "f64le", columns: number): { row: number | null; sweep: number | null } {
  if (encoding === "f64le") {
    const width = 8 * columns;
    if (columns < 1) return { row: null, sweep: null };
    const row = Math.floor(offset / width);
    if ((row + 1) * width > bytes.length) return { row: row + 1, sweep: null };
    return { row: row + 1, sweep: bytes.readDoubleLE(row * width) };
  }
  const upTo = Math.min(offset, bytes.length);
  let lines = 0;
  let lineStart = 0;
  for (let i = 0; i < upTo; i++) if (bytes[i] === 0x0a) { lines++; lineStart = i + 1; }
  if (lines === 0) return { row: null, sweep: null }; // in the header
  const end = bytes.indexOf(0x0a, lineStart);
  const line = bytes.subarray(lineStart, end < 0 ? bytes.length : end).toString("utf8");
  const sweep = Number(line.split(",")[0]);
  return { row: lines, sweep: line.length > 0 && Number.isFinite(sweep) ? sweep : null };
}

/** Compare archived file `archived` (read from disk) with the replay's file; `series` describes a series file. */
export function compareFile(
  relPath: string,
  archivedFile: string,
  archivedSha256: string,
  replayFile: string,
  series?: { encoding: "csv" | "f64le"; columns: number },
): FileComparison {
  const a = fs.readFileSync(archivedFile);
  const archiveIntact = sha256(a) === archivedSha256;
  if (!fs.existsSync(replayFile)) {
    return { path: relPath, archivedSha256, replaySha256: null, identical: false, archiveIntact, difference: { kind: "missing" } };
  }
  const b = fs.readFileSync(replayFile);
  const replaySha256 = sha256(b);
  // The archive's bytes are compared, not only its recorded hash: a tampered archive shows as a difference here.
  const offset = firstDifferingByte(a, b);
  if (offset < 0) return { path: relPath, archivedSha256, replaySha256, identical: true, archiveIntact, difference: null };
  const where = series ? locateRow(a, offset, series.encoding, series.columns) : { row: null, sweep: null };
  return { path: relPath, archivedSha256, replaySha256, identical: false, archiveIntact, difference: { kind: "bytes", offset, ...where, archivedBytes: a.length, replayBytes: b.length } };
}
