// Expansion of a spec's scan into points × replicas, seed derivation and the spec hash.
import { describe, expect, it } from "vitest";
import { axisValues, deriveSeed, expandSpec, parseSpec, specHash } from "@/lib/spec";
import { splitmix64Output } from "@/lib/spec/seeds";

const spec = (over: Record<string, unknown> = {}) => parseSpec({
  format: "ergodex.ensemble/1", name: "scan", sampler: { name: "ising2d", version: "1.0.0" },
  fixed: { algorithm: "metropolis" }, replicas: 3, thermalization: 100, measurements: 200, seed: "20251201",
  resources: { cores: 1, wallMinutes: 30 }, scan: [{ param: "L", values: [8, 16] }, { param: "T", linear: { from: 2.0, to: 2.5, points: 6 } }],
  ...over,
});

describe("scan axes", () => {
  it("linear: both ends included, evenly spaced, written as the decimals they are", () => {
    expect(axisValues({ param: "T", linear: { from: 2.0, to: 2.5, points: 6 } })).toEqual([2.0, 2.1, 2.2, 2.3, 2.4, 2.5]);
    expect(axisValues({ param: "T", linear: { from: 3, to: 1, points: 3 } })).toEqual([3, 2, 1]);
  });
  it("log: geometric steps, both ends included; integer ends stay integers", () => {
    expect(axisValues({ param: "L", log: { from: 8, to: 64, points: 4 } })).toEqual([8, 16, 32, 64]);
    const v = axisValues({ param: "beta", log: { from: 0.01, to: 100, points: 5 } }) as number[];
    expect(v).toEqual([0.01, 0.1, 1, 10, 100]);
  });
  it("explicit values are taken as given, in order", () => {
    expect(axisValues({ param: "algorithm", values: ["wolff", "metropolis"] })).toEqual(["wolff", "metropolis"]);
  });
});

describe("expandSpec", () => {
  it("cartesian product: 2 × 6 points, the last axis fastest, fixed params at every point, 3 replicas each", () => {
    const { points, runs } = expandSpec(spec());
    expect(points).toHaveLength(12);
    expect(runs).toHaveLength(36);
    expect(points[0]).toEqual({ index: 0, params: { algorithm: "metropolis", L: 8, T: 2.0 } });
    expect(points[1].params).toEqual({ algorithm: "metropolis", L: 8, T: 2.1 });
    expect(points[6].params).toEqual({ algorithm: "metropolis", L: 16, T: 2.0 });
    expect(points[11]).toEqual({ index: 11, params: { algorithm: "metropolis", L: 16, T: 2.5 } });
    const combos = new Set(points.map((p) => `${p.params.L}/${p.params.T}`));
    expect(combos.size).toBe(12);
    expect(runs.filter((r) => r.pointIndex === 5).map((r) => r.replica)).toEqual([0, 1, 2]);
  });
  it("an empty scan is one point with the fixed parameters", () => {
    const { points, runs } = expandSpec(spec({ scan: [], fixed: { algorithm: "wolff", L: 8, T: 2.269 }, replicas: 4 }));
    expect(points).toEqual([{ index: 0, params: { algorithm: "wolff", L: 8, T: 2.269 } }]);
    expect(runs.map((r) => r.replica)).toEqual([0, 1, 2, 3]);
  });
  it("three axes multiply: 2 × 3 × 2", () => {
    const s = spec({ fixed: {}, scan: [
      { param: "algorithm", values: ["metropolis", "wolff"] }, { param: "L", values: [8, 16, 32] }, { param: "T", values: [2.2, 2.4] }] });
    expect(expandSpec(s).points).toHaveLength(12);
  });
});

describe("seeds", () => {
  // Reference outputs of SplitMix64 (Vigna's splitmix64.c), recalled from memory: state 0 gives
  // 0xe220a8397b1dcdaf first; state 1234567 gives 6457827717110365317, 3203168211198807973, …
  it("the SplitMix64 underneath reproduces its reference outputs", () => {
    expect(splitmix64Output(0n, 1n)).toBe(0xe220a8397b1dcdafn);
    expect([1n, 2n, 3n].map((k) => splitmix64Output(1234567n, k).toString()))
      .toEqual(["6457827717110365317", "3203168211198807973", "9817491932198370423"]);
  });
  it("are the documented function of master seed, point index and replica", () => {
    const masterKey = splitmix64Output(20251201n, 1n);
    const pointKey = splitmix64Output(masterKey, 4n);
    expect(deriveSeed("20251201", 3, 1)).toBe(splitmix64Output(pointKey, 2n).toString());
  });
  it("the same spec gives the same seeds; another master seed gives others", () => {
    const a = expandSpec(spec()).runs.map((r) => r.seed);
    expect(expandSpec(spec()).runs.map((r) => r.seed)).toEqual(a);
    const b = expandSpec(spec({ seed: "20251202" })).runs.map((r) => r.seed);
    expect(b.filter((s) => a.includes(s))).toEqual([]);
  });
  it("are distinct u64 values over 100 points × 100 replicas, and at the edges of the seed range", () => {
    const seen = new Set<string>();
    for (const master of ["0", "18446744073709551615"]) {
      for (let p = 0; p < 100; p++) for (let r = 0; r < 100; r++) seen.add(deriveSeed(master, p, r));
    }
    expect(seen.size).toBe(20_000);
    for (const s of seen) expect(BigInt(s) < 1n << 64n && BigInt(s) >= 0n).toBe(true);
  });
  it("refuse a malformed master seed or index with a reason", () => {
    expect(() => deriveSeed("-1", 0, 0)).toThrow(/unsigned 64-bit/);
    expect(() => deriveSeed("1", -1, 0)).toThrow(/pointIndex/);
    expect(() => deriveSeed("1", 0, 1.5)).toThrow(/replica/);
  });
});

describe("specHash", () => {
  it("does not depend on key order or whitespace, and changes with any value", () => {
    const a = { format: "ergodex.ensemble/1", name: "x", fixed: { L: 8, T: 2 }, tags: ["a", "b"] };
    const b = JSON.parse('{ "tags": ["a","b"],  "fixed": {"T": 2, "L": 8}, "name": "x", "format": "ergodex.ensemble/1" }');
    expect(specHash(b)).toBe(specHash(a));
    expect(specHash(a)).toMatch(/^[0-9a-f]{64}$/);
    expect(specHash({ ...a, fixed: { L: 8, T: 2.0001 } })).not.toBe(specHash(a));
    expect(specHash({ ...a, tags: ["b", "a"] })).not.toBe(specHash(a)); // array order is meaningful
  });
  it("is the same for a spec given as YAML and as JSON", () => {
    const yaml = `format: ergodex.ensemble/1\nname: scan\nsampler: {name: ising2d, version: "1.0.0"}\nfixed: {algorithm: metropolis}\nreplicas: 3\n` +
      `thermalization: 100\nmeasurements: 200\nseed: "20251201"\nresources: {cores: 1, wallMinutes: 30}\n` +
      `scan:\n  - {param: L, values: [8, 16]}\n  - {param: T, linear: {from: 2.0, to: 2.5, points: 6}}\n`;
    expect(specHash(parseSpec(yaml))).toBe(specHash(spec()));
  });
});
