// Building blocks of the samplers: seeding, variates, tridiagonal eigenvalues.
import { describe, expect, it } from "vitest";
import { createRng, parseSeed, seedToState, uniform01 } from "@/lib/samplers/rng";
import { chi, gamma, normal } from "@/cluster-fake/samplers/variates";
import { sturmCount, tridiagEigenvalues } from "@/cluster-fake/samplers/tridiag-eigen";
import { SIGMA, mean, variance } from "./helpers";

describe("seed -> RNG", () => {
  it("SplitMix64 (Steele, Lea & Flood 2014) first output from state 0 is 0xe220a8397b1dcdaf (recalled from memory)", () => {
    const [hi, lo] = seedToState("0");
    expect(((BigInt(hi >>> 0) << 32n) | BigInt(lo >>> 0)).toString(16)).toBe("e220a8397b1dcdaf");
  });
  it("accepts the full unsigned 64-bit range and rejects anything else", () => {
    expect(parseSeed("18446744073709551615")).toBe(2n ** 64n - 1n);
    for (const bad of ["18446744073709551616", "-1", "01", "1.5", "", " 1", "abc"]) {
      expect(() => parseSeed(bad), bad).toThrow(/seed/);
    }
  });
  it("same seed, same stream; neighbouring seeds, unrelated streams", () => {
    const draw = (seed: string) => Array.from({ length: 8 }, ((r) => () => r.next())(createRng(seed)));
    expect(draw("12345")).toEqual(draw("12345"));
    const a = draw("1");
    const b = draw("2");
    expect(a.filter((x, i) => x === b[i]).length).toBe(0);
  });
  it("uniform01 lies in [0,1) with mean 1/2 and variance 1/12 (4 sigma)", () => {
    const rng = createRng("99");
    const n = 200_000;
    const x = Float64Array.from({ length: n }, () => uniform01(rng));
    expect(x.reduce((a, b) => Math.min(a, b))).toBeGreaterThanOrEqual(0);
    expect(x.reduce((a, b) => Math.max(a, b))).toBeLessThan(1);
    expect(Math.abs(mean(x) - 0.5)).toBeLessThan(SIGMA * Math.sqrt(1 / 12 / n));
    // Var of the sample variance of U(0,1): (μ4 − σ⁴)/n with μ4 = 1/80.
    expect(Math.abs(variance(x) - 1 / 12)).toBeLessThan(SIGMA * Math.sqrt((1 / 80 - 1 / 144) / n));
  });
});

describe("variates", () => {
  const n = 100_000;
  it("Box–Muller (1958) normal: mean 0, variance 1 (4 sigma; Var of s² is 2/n)", () => {
    const rng = createRng("5");
    const x = Float64Array.from({ length: n }, () => normal(rng));
    expect(Math.abs(mean(x))).toBeLessThan(SIGMA * Math.sqrt(1 / n));
    expect(Math.abs(variance(x) - 1)).toBeLessThan(SIGMA * Math.sqrt(2 / n));
  });
  // Gamma(k,1) has mean k, variance k, fourth central moment 3k² + 6k (textbook moments),
  // so the sample variance has standard error sqrt((3k² + 6k − k²)/n).
  it.each([0.25, 0.5, 1, 2.5, 10, 150])("Marsaglia–Tsang (2000) gamma, shape %f: mean and variance", (k) => {
    const rng = createRng(String(Math.round(k * 100)));
    const x = Float64Array.from({ length: n }, () => gamma(rng, k));
    expect(x.reduce((a, b) => Math.min(a, b))).toBeGreaterThan(0);
    expect(Math.abs(mean(x) - k)).toBeLessThan(SIGMA * Math.sqrt(k / n));
    expect(Math.abs(variance(x) - k)).toBeLessThan(SIGMA * Math.sqrt((2 * k * k + 6 * k) / n));
  });
  it("chi with k degrees of freedom: E[χ²] = k; χ_0 = 0", () => {
    const rng = createRng("17");
    for (const k of [1, 3.5, 40]) {
      const x2 = Float64Array.from({ length: n }, () => chi(rng, k) ** 2);
      expect(Math.abs(mean(x2) - k)).toBeLessThan(SIGMA * Math.sqrt((2 * k) / n)); // Var χ²_k = 2k
    }
    expect(chi(rng, 0)).toBe(0);
    expect(() => gamma(rng, 0)).toThrow(/shape/);
  });
});

describe("tridiagonal eigenvalues (implicit QR, Golub & Van Loan §8.3)", () => {
  it("tridiag(1, 0, 1) of size n has eigenvalues 2cos(kπ/(n+1)) (textbook result)", () => {
    for (const n of [1, 2, 3, 10, 101]) {
      const eig = tridiagEigenvalues(new Float64Array(n), new Float64Array(n - 1 > 0 ? n - 1 : 0).fill(1));
      const exact = Array.from({ length: n }, (_, k) => 2 * Math.cos(((k + 1) * Math.PI) / (n + 1))).sort((a, b) => a - b);
      for (let i = 0; i < n; i++) expect(Math.abs(eig[i] - exact[i])).toBeLessThan(1e-12);
    }
  });
  it("random matrices: trace identities and Sturm counts (Barth, Martin & Wilkinson 1967)", () => {
    const rng = createRng("3");
    for (const n of [2, 7, 60, 300]) {
      const d = Float64Array.from({ length: n }, () => normal(rng));
      const e = Float64Array.from({ length: n - 1 }, () => chi(rng, 3));
      const eig = tridiagEigenvalues(d, e);
      const tr = d.reduce((s, x) => s + x, 0);
      const tr2 = d.reduce((s, x) => s + x * x, 0) + 2 * e.reduce((s, x) => s + x * x, 0);
      expect(Math.abs(eig.reduce((s, x) => s + x, 0) - tr)).toBeLessThan(1e-10 * n);
      expect(Math.abs(eig.reduce((s, x) => s + x * x, 0) / tr2 - 1)).toBeLessThan(1e-12);
      // Between consecutive eigenvalues the Sturm count must be exactly the index.
      for (let i = 0; i + 1 < n; i++) {
        if (eig[i + 1] - eig[i] > 1e-9) expect(sturmCount(d, e, (eig[i] + eig[i + 1]) / 2)).toBe(i + 1);
      }
      expect(sturmCount(d, e, eig[0] - 1e-6)).toBe(0);
      expect(sturmCount(d, e, eig[n - 1] + 1e-6)).toBe(n);
    }
  });
  it("rejects mismatched lengths", () => {
    expect(() => tridiagEigenvalues([1, 2, 3], [1])).toThrow(/off-diagonal/);
  });
});
