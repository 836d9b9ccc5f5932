// The binary COPY stream decoded independently, field by field, per PostgreSQL's binary COPY format.
import { describe, expect, it } from "vitest";
import { CHUNK_VALUES, seriesCopyBinary } from "@/lib/importer/copy-series";

const RUN = "0f1e2d3c-4b5a-4968-8776-a5b4c3d2e1f0";

function decode(buf: Buffer) {
  expect(buf.subarray(0, 11).toString("latin1")).toBe("PGCOPY\n\xff\r\n\0");
  let o = 19;
  const rows: { run: string; observable: string; chunk: number; start: number; values: number[] }[] = [];
  for (;;) {
    const fields = buf.readInt16BE(o); o += 2;
    if (fields === -1) break;
    expect(fields).toBe(5);
    const field = () => { const len = buf.readInt32BE(o); o += 4; const b = buf.subarray(o, o + len); o += len; return b; };
    const run = field().toString("hex").replace(/^(.{8})(.{4})(.{4})(.{4})(.{12})$/, "$1-$2-$3-$4-$5");
    const observable = field().toString("utf8");
    const chunk = field().readInt32BE(0);
    const start = field().readInt32BE(0);
    const arr = field();
    expect([arr.readInt32BE(0), arr.readInt32BE(4), arr.readInt32BE(8), arr.readInt32BE(16)]).toEqual([1, 0, 701, 1]); // ndim, nulls, float8 oid, lower bound
    const n = arr.readInt32BE(12);
    const values = Array.from({ length: n }, (_, i) => { expect(arr.readInt32BE(20 + 12 * i)).toBe(8); return arr.readDoubleBE(24 + 12 * i); });
    rows.push({ run, observable, chunk, start, values });
  }
  expect(o).toBe(buf.length);
  return rows;
}

describe("seriesCopyBinary", () => {
  it("writes one tuple per chunk per column, values exact, chunks tiling each column", () => {
    const n = CHUNK_VALUES + 5;
    const sweep = Float64Array.from({ length: n }, (_, i) => i + 1);
    const e = Float64Array.from({ length: n }, (_, i) => Math.sin(i) * 1e-3 - 1.5);
    const rows = decode(Buffer.concat([...seriesCopyBinary(RUN, ["sweep", "e"], [sweep, e])]));
    expect(rows.map((r) => [r.observable, r.chunk, r.start, r.values.length])).toEqual([
      ["sweep", 0, 0, CHUNK_VALUES], ["sweep", 1, CHUNK_VALUES, 5], ["e", 0, 0, CHUNK_VALUES], ["e", 1, CHUNK_VALUES, 5],
    ]);
    expect(rows.every((r) => r.run === RUN)).toBe(true);
    expect([...rows[2].values, ...rows[3].values]).toEqual(Array.from(e));
  });

  it("refuses a run id that is not a uuid", () => {
    expect(() => [...seriesCopyBinary("run-1", ["a"], [new Float64Array(1)])]).toThrow(/not a uuid/);
  });
});
