// Parse a bundle's series file (csv or f64le) into columns, refusing anything that is not clean data.
import fs from "node:fs";
import os from "node:os";
import { bundleError, type BundleLocation } from "./bundle-error";

/** The series as columns: columns[0] is "sweep", values[k] holds column k for every row. */
export type ParsedSeries = { rows: number; columns: string[]; values: Float64Array[] };

/** Largest series file read; the columns are held in memory for the estimates anyway. */
export const MAX_SERIES_BYTES = 1 << 30;

// Plain decimal notation only: Number() alone would accept "", " 1", "0x1f" and "Infinity".
const DECIMAL = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/;
const NON_FINITE = /^[+-]?(?:nan|inf|infinity)$/i;

// Number() plus the few cases where it is laxer than DECIMAL (whitespace around, "0x"/"0o"/"0b"
// prefixes, "Infinity") accepts exactly what DECIMAL accepts, at a fraction of the cost; the regex
// only picks the message for a value that failed. Locations, too, are built only on failure:
// an object per value would double the parse time.
function plainDecimal(text: string, v: number): boolean {
  if (!Number.isFinite(v) || text.length === 0) return false;
  const first = text.charCodeAt(0);
  const last = text.charCodeAt(text.length - 1);
  const firstOk = (first >= 48 && first <= 57) || first === 45 || first === 43 || first === 46;
  const lastOk = (last >= 48 && last <= 57) || last === 46;
  if (!firstOk || !lastOk) return false;
  if (first === 48 && text.length > 1) {
    const second = text.charCodeAt(1) | 32;
    if (second === 120 || second === 111 || second === 98) return false; // x, o, b
  }
  return true;
}

/** Why `text` is not a plain finite decimal: the error for a value that failed {@link plainDecimal}. */
function fieldError(text: string, where: BundleLocation) {
  if (NON_FINITE.test(text)) return bundleError(where, `${JSON.stringify(text)} is not finite (NaN and ±Infinity are not allowed)`);
  if (DECIMAL.test(text)) return bundleError(where, `${JSON.stringify(text)} overflows a float64 (not finite)`);
  return bundleError(where, `${JSON.stringify(text)} is not a decimal number`);
}

/** Sweeps are sweep counts: non-negative integers, strictly increasing down the file. */
const sweepOk = (sweep: number, previous: number | undefined) => Number.isInteger(sweep) && sweep >= 0 && (previous === undefined || sweep > previous);

/** The error for a sweep that failed {@link sweepOk}; `previousAt` names the previous row. */
function sweepError(sweep: number, previous: number | undefined, where: BundleLocation, previousAt: string) {
  if (!Number.isInteger(sweep) || sweep < 0) return bundleError(where, `sweep ${sweep} is not a non-negative integer`);
  if (sweep === previous) return bundleError(where, `sweep ${sweep} repeats the sweep of ${previousAt} (duplicate measurement)`);
  return bundleError(where, `sweep ${sweep} is smaller than ${previous} at ${previousAt}: sweeps must increase strictly`);
}

function widthError(file: string, line: number, text: string, width: number) {
  return bundleError({ file, line }, `has ${text.split(",").length} columns, the header has ${width}`);
}

function checkSize(file: string, name: string): number {
  const bytes = fs.statSync(file).size;
  if (bytes > MAX_SERIES_BYTES) throw bundleError({ file: name }, `is ${bytes} bytes, more than the limit of ${MAX_SERIES_BYTES}`);
  return bytes;
}

function allocate(columns: number, rows: number): Float64Array[] {
  return Array.from({ length: columns }, () => new Float64Array(rows));
}

/**
 * Parse a csv series: header `sweep,<observables in manifest order>`, then exactly `rows` rows of
 * finite decimal numbers, each line ending in a newline (a missing final newline means a cut-off
 * file). `name` is the file's name in the bundle, used in every message.
 */
export async function parseCsvSeries(file: string, name: string, observables: readonly string[], rows: number): Promise<ParsedSeries> {
  const columns = ["sweep", ...observables];
  const bytes = checkSize(file, name);
  // Each row needs at least one digit and one separator per column; this bounds the allocation.
  if (rows * columns.length * 2 > bytes) {
    throw bundleError({ file: name }, `manifest.json /series/rows says ${rows} rows, but ${bytes} bytes cannot hold that many rows of ${columns.length} columns`);
  }
  const values = allocate(columns.length, rows);
  const header = columns.join(",");
  const width = columns.length;
  let line = 0;
  let row = 0;
  // One line [from, to) of `text`: fields are found with indexOf and sliced, not split into arrays,
  // which halves the parse time of a large series.
  const take = (text: string, from: number, to: number) => {
    line++;
    if (to > from && text.charCodeAt(to - 1) === 13) to--; // tolerate CRLF
    if (line === 1) {
      const got = text.slice(from, to);
      if (got !== header) throw bundleError({ file: name, line }, `header must be "${header}" (sweep, then the manifest's observables in order), got ${JSON.stringify(got.slice(0, 200))}`);
      return;
    }
    if (to === from) throw bundleError({ file: name, line }, "is empty");
    if (row >= rows) throw bundleError({ file: name, line }, `more data rows than manifest.json /series/rows = ${rows}`);
    let start = from;
    for (let c = 0; c < width - 1; c++) {
      const end = text.indexOf(",", start);
      if (end === -1 || end >= to) throw widthError(name, line, text.slice(from, to), width);
      const field = text.slice(start, end);
      const v = Number(field);
      if (!plainDecimal(field, v)) throw fieldError(field, { file: name, line, column: columns[c] });
      values[c][row] = v;
      start = end + 1;
    }
    const last = text.slice(start, to);
    if (last.includes(",")) throw widthError(name, line, text.slice(from, to), width);
    const v = Number(last);
    if (!plainDecimal(last, v)) throw fieldError(last, { file: name, line, column: columns[width - 1] });
    values[width - 1][row] = v;
    const sweep = values[0][row];
    const previous = row > 0 ? values[0][row - 1] : undefined;
    if (!sweepOk(sweep, previous)) throw sweepError(sweep, previous, { file: name, line, column: "sweep" }, `line ${line - 1}`);
    row++;
  };
  let carry = "";
  const stream = fs.createReadStream(file, { encoding: "utf8", highWaterMark: 1 << 20 });
  for await (const piece of stream as AsyncIterable<string>) {
    const text = carry + piece;
    let from = 0;
    for (let nl = text.indexOf("\n"); nl !== -1; nl = text.indexOf("\n", from)) {
      take(text, from, nl);
      from = nl + 1;
    }
    carry = text.slice(from);
  }
  if (carry !== "") throw bundleError({ file: name, line: line + 1 }, "does not end with a newline: the last row is incomplete (file cut off?)");
  if (line === 0) throw bundleError({ file: name }, "is empty");
  if (row !== rows) throw bundleError({ file: name }, `has ${row} data rows, manifest.json /series/rows says ${rows}`);
  return { rows, columns, values };
}

/**
 * Parse an f64le series: the same columns as little-endian float64, row-major, no header. The
 * byte length must be a whole number of rows and match `rows`; every value finite.
 */
export function parseF64leSeries(file: string, name: string, observables: readonly string[], rows: number): ParsedSeries {
  const columns = ["sweep", ...observables];
  const rowBytes = 8 * columns.length;
  const bytes = checkSize(file, name);
  if (bytes % rowBytes !== 0) {
    const whole = Math.floor(bytes / rowBytes);
    throw bundleError({ file: name, row: whole + 1 }, `is truncated: ${bytes} bytes is not a multiple of ${rowBytes} (${columns.length} columns × 8 bytes); row ${whole + 1} is incomplete`);
  }
  const found = bytes / rowBytes;
  if (found !== rows) throw bundleError({ file: name }, `has ${found} rows (${bytes} bytes), manifest.json /series/rows says ${rows}`);
  const raw = fs.readFileSync(file);
  const flat = decodeLittleEndian(raw);
  const values = allocate(columns.length, rows);
  for (let r = 0; r < rows; r++) {
    for (let c = 0; c < columns.length; c++) {
      const v = flat[r * columns.length + c];
      if (!Number.isFinite(v)) throw bundleError({ file: name, row: r + 1, column: columns[c] }, `value ${v} at byte ${(r * columns.length + c) * 8} is not finite (NaN and ±Infinity are not allowed)`);
      values[c][r] = v;
    }
    const previous = r > 0 ? values[0][r - 1] : undefined;
    if (!sweepOk(values[0][r], previous)) throw sweepError(values[0][r], previous, { file: name, row: r + 1, column: "sweep" }, `row ${r}`);
  }
  return { rows, columns, values };
}

function decodeLittleEndian(raw: Buffer): Float64Array {
  const out = new Float64Array(raw.length / 8);
  if (os.endianness() === "LE") {
    new Uint8Array(out.buffer).set(raw); // a copy, so alignment of the Buffer does not matter
  } else {
    for (let i = 0; i < out.length; i++) out[i] = raw.readDoubleLE(i * 8);
  }
  return out;
}
