import { describe, expect, it } from "vitest";
import { autocovariance, paddedFftSize } from "@/lib/analysis/autocovariance";
import { ar1, normals } from "./support";

/** Γ(t) straight from its definition, O(n·L): the reference the FFT path must reproduce. */
function direct(x: Float64Array, maxLag: number): Float64Array {
  const n = x.length;
  const mean = x.reduce((a, b) => a + b, 0) / n;
  const g = new Float64Array(maxLag + 1);
  for (let t = 0; t <= maxLag; t++) {
    let s = 0;
    for (let i = 0; i + t < n; i++) s += (x[i] - mean) * (x[i + t] - mean);
    g[t] = s / (n - t);
  }
  return g;
}

describe("autocovariance by zero-padded FFT equals the definition (linear, not circular)", () => {
  // Sizes cover every branch of the packing: n = 2 (N = 4), odd/even n, n at and just past a power of two.
  for (const n of [2, 3, 4, 5, 7, 8, 9, 31, 32, 33, 100, 1000, 1024, 1025, 4097]) {
    it(`n = ${n}, all lags 0..n−1`, () => {
      const x = normals(n, n, 3, 2);
      const fast = autocovariance(x, n - 1);
      const ref = direct(x, n - 1);
      const scale = ref[0];
      // round-off of a length-N FFT: a few ulp × log N relative to Γ(0); 1e-12 is generous
      for (let t = 0; t < n; t++) expect(Math.abs(fast[t] - ref[t])).toBeLessThanOrEqual(1e-12 * scale);
    });
  }

  it("pads to the smallest power of two ≥ 2n", () => {
    expect([1, 2, 3, 4, 5, 1024, 1025].map(paddedFftSize)).toEqual([2, 4, 8, 8, 16, 2048, 4096]);
  });

  it("a correlated series (AR(1), φ = 0.95) matches the definition at the lags the Gamma method uses", () => {
    const x = ar1(1 << 15, 0.95, 4);
    const fast = autocovariance(x, 400);
    const ref = direct(x, 400);
    for (let t = 0; t <= 400; t++) expect(Math.abs(fast[t] - ref[t])).toBeLessThanOrEqual(1e-11 * ref[0]);
  });
});
