// The series parsers on small hand-written files: exact values, and each refusal with its place.
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { parseCsvSeries, parseF64leSeries } from "@/lib/importer/parse-series";

const dir = fs.mkdtempSync(path.join(os.tmpdir(), "ergodex-parse-"));
afterAll(() => fs.rmSync(dir, { recursive: true, force: true }));
let n = 0;
const write = (content: string | Buffer) => {
  const file = path.join(dir, `s${n++}`);
  fs.writeFileSync(file, content);
  return file;
};
const csv = (text: string, rows: number, obs = ["a", "b"]) => parseCsvSeries(write(text), "series.csv", obs, rows);

describe("parseCsvSeries", () => {
  it("reads header and rows into columns, the decimal text read as JavaScript reads it", async () => {
    const s = await csv("sweep,a,b\n1,0.1,-2.5e-3\n2,+.5,7.\n4,1e300,-0\n", 3);
    expect(s.columns).toEqual(["sweep", "a", "b"]);
    expect(Array.from(s.values[0])).toEqual([1, 2, 4]);
    expect(Array.from(s.values[1])).toEqual([0.1, 0.5, 1e300]);
    expect(Array.from(s.values[2])).toEqual([-0.0025, 7, -0]);
  });

  it("accepts CRLF line ends", async () => {
    const s = await csv("sweep,a,b\r\n1,1,2\r\n2,3,4\r\n", 2);
    expect(Array.from(s.values[2])).toEqual([2, 4]);
  });

  it.each([
    ["sweep,a,b\n1,1,2\n2,3,4", 2, /line 3: does not end with a newline/],
    ["sweep,a,b\n1,1,2\n\n", 2, /line 3: is empty/],
    ["sweep,b,a\n1,1,2\n", 1, /line 1: header must be "sweep,a,b"/],
    ["sweep,a,b\n1,1,2,3\n", 1, /line 2: has 4 columns, the header has 3/],
    ["sweep,a,b\n1,1\n", 1, /line 2: has 2 columns, the header has 3/],
    ["sweep,a,b\n1, 1,2\n", 1, /line 2 column "a": " 1" is not a decimal number/],
    ["sweep,a,b\n1,0b11,2\n", 1, /line 2 column "a": "0b11" is not a decimal number/],
    ["sweep,a,b\n1,1,inf\n", 1, /line 2 column "b": "inf" is not finite/],
    ["sweep,a,b\n1,nan,1\n", 1, /line 2 column "a": "nan" is not finite/],
    ["sweep,a,b\n1.5,1,1\n", 1, /line 2 column "sweep": sweep 1.5 is not a non-negative integer/],
    ["sweep,a,b\n-1,1,1\n", 1, /line 2 column "sweep": sweep -1 is not a non-negative integer/],
    ["sweep,a,b\n5,1,1\n5,1,1\n", 2, /line 3 column "sweep": sweep 5 repeats the sweep of line 2/],
    ["sweep,a,b\n5,1,1\n4,1,1\n", 2, /line 3 column "sweep": sweep 4 is smaller than 5 at line 2/],
    ["sweep,a,b\n1,1,1\n2,1,1\n", 1, /line 3: more data rows than manifest.json \/series\/rows = 1/],
    ["sweep,a,b\n1,1,1\n2,1,1\n", 3, /has 2 data rows, manifest.json \/series\/rows says 3/],
    ["sweep,a,b\n1,1,1\n", 1000, /cannot hold that many rows/],
  ])("refuses %j (rows %i)", async (text, rows, reason) => {
    await expect(csv(text, rows)).rejects.toMatchObject({ code: "invalid", message: expect.stringMatching(reason) });
  });

  it("puts file, line and column into the error details", async () => {
    const err = await csv("sweep,a,b\n1,1,NaN\n", 1).catch((e) => e);
    expect(err.details).toMatchObject({ file: "series.csv", line: 2, column: "b" });
    expect(err.message).toBe('series.csv line 2 column "b": "NaN" is not finite (NaN and ±Infinity are not allowed)');
  });

  it("keeps line numbers right across the 1 MiB read blocks", async () => {
    const rows = 60_000; // about 1.3 MB, so lines straddle a block boundary
    const lines = ["sweep,a,b"];
    for (let i = 0; i < rows; i++) lines.push(`${i},${i * 0.5},${-i}`);
    lines[45_001] = "45000,1,x";
    await expect(csv(lines.join("\n") + "\n", rows)).rejects.toThrow(/^series\.csv line 45002 column "b": "x" is not a decimal number/);
    lines[45_001] = "45000,22500,-45000";
    const s = await csv(lines.join("\n") + "\n", rows);
    expect(s.values[1][59_999]).toBe(29_999.5);
  });
});

describe("parseF64leSeries", () => {
  const f64 = (rows: number[][]) => {
    const buf = Buffer.alloc(rows.length * rows[0].length * 8);
    rows.flat().forEach((v, i) => buf.writeDoubleLE(v, i * 8));
    return buf;
  };

  it("reads row-major little-endian float64 into columns", () => {
    const s = parseF64leSeries(write(f64([[1, 0.1, 2], [3, -0.5, 1e-300]])), "series.f64le", ["a", "b"], 2);
    expect(Array.from(s.values[0])).toEqual([1, 3]);
    expect(Array.from(s.values[2])).toEqual([2, 1e-300]);
  });

  it("refuses a truncated file, a wrong row count, non-finite values and bad sweeps, with the row", () => {
    const good = f64([[1, 1, 1], [2, 2, 2]]);
    expect(() => parseF64leSeries(write(good.subarray(0, 40)), "series.f64le", ["a", "b"], 2)).toThrow(/row 2: is truncated: 40 bytes is not a multiple of 24/);
    expect(() => parseF64leSeries(write(good), "series.f64le", ["a", "b"], 3)).toThrow(/has 2 rows \(48 bytes\), manifest.json \/series\/rows says 3/);
    expect(() => parseF64leSeries(write(f64([[1, 1, 1], [2, Infinity, 2]])), "series.f64le", ["a", "b"], 2)).toThrow(/row 2 column "a": value Infinity at byte 32 is not finite/);
    expect(() => parseF64leSeries(write(f64([[2, 1, 1], [2, 1, 1]])), "series.f64le", ["a", "b"], 2)).toThrow(/row 2 column "sweep": sweep 2 repeats the sweep of row 1/);
  });
});
