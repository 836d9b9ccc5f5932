// Which derived ising2d quantities are formed from which series, and what happens without L and T.
import { describe, expect, it } from "vitest";
import { binderCumulant, estimateSeries, gammaMethod, specificHeat, susceptibility } from "@/lib/analysis";
import { derivedIsingEstimates, type PrimaryFit } from "@/lib/estimates/derived-ising";

// An AR(1)-like chain (x_{t+1} = 0.5 x_t + noise) from a fixed linear congruential generator: cheap, deterministic, autocorrelated.
function chain(n: number, seed: number, offset: number, scale: number): Float64Array {
  const x = new Float64Array(n);
  let s = seed >>> 0;
  let v = 0;
  for (let i = 0; i < n; i++) {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    v = 0.5 * v + (s / 2 ** 32 - 0.5);
    x[i] = offset + scale * v;
  }
  return x;
}

describe("derivedIsingEstimates", () => {
  const m2 = chain(2000, 1, 0.5, 0.1);
  const m4 = m2.map((v) => v * v * 1.2);
  const e = chain(2000, 2, -1.4, 0.2);

  it("forms U4 from m2 and m4 and C from e, equal to the library's functions, and skips chi without absM", () => {
    const out = derivedIsingEstimates(new Map([["m2", m2], ["m4", m4], ["e", e]]), { L: 8, T: 2.3 });
    expect(out.map((o) => o.observable)).toEqual(["U4", "C"]);
    const [u4, c] = out as { result: { mean: number; error: number } }[];
    expect(u4.result).toMatchObject({ mean: binderCumulant(m2, m4).mean, error: binderCumulant(m2, m4).error });
    expect(c.result.mean).toBe(specificHeat(e, { sites: 64, temperature: 2.3 }).mean);
  });

  it("reports a problem for each quantity when L or T is missing or invalid", () => {
    for (const params of [{ L: 8 }, { T: 2.3 }, { L: 8.5, T: 2 }, { L: 8, T: -1 }]) {
      const out = derivedIsingEstimates(new Map([["e", e]]), params);
      expect(out.map((o) => o.observable)).toEqual(["U4", "chi", "C"]);
      expect(out.every((o) => "problem" in o && /needs params L/.test(o.problem))).toBe(true);
    }
  });

  it("turns an analysis refusal (too short a series) into a problem", () => {
    const out = derivedIsingEstimates(new Map([["e", e.subarray(0, 5)]]), { L: 8, T: 2.3 });
    expect(out).toHaveLength(1);
    expect(out[0]).toMatchObject({ observable: "C", problem: expect.stringMatching(/points|short/) });
  });
});

describe("derivedIsingEstimates with the primary fits", () => {
  // Start out of equilibrium so that MSER cuts something and the inputs' cuts differ.
  const m2 = chain(6000, 3, 0.5, 0.1).map((v, i) => v + (i < 300 ? 0.3 * (1 - i / 300) : 0));
  const m4 = m2.map((v) => v * v * 1.3);
  const absM = m2.map((v) => Math.sqrt(v) * 0.97);
  const e = chain(6000, 4, -1.4, 0.2);
  const series = new Map([["m2", m2], ["m4", m4], ["absM", absM], ["e", e]]);
  const fits = new Map<string, PrimaryFit>([...series].map(([k, x]) => { const r = estimateSeries(x); return [k, { cut: r.cut.index, tauInt: r.tauInt }]; }));
  const out = new Map(derivedIsingEstimates(series, { L: 8, T: 2.3 }, fits).map((o) => [o.observable, (o as { result: import("@/lib/analysis").DerivedEstimate }).result]));
  // The rule written out again: largest cut of the inputs, bins of ceil(20 τ) with τ the largest input τ, at least 20 bins.
  const rule = (names: string[], extraTau: (cut: number) => number[] = () => []) => {
    const cut = Math.max(...names.map((n) => fits.get(n)!.cut));
    const tau = Math.max(...names.map((n) => fits.get(n)!.tauInt), ...extraTau(cut));
    return { cut, binSize: Math.min(Math.ceil(20 * tau), Math.floor((6000 - cut) / 20)) };
  };
  // Means agree to rounding (1e-12 relative). An error is a spread of nearly equal leave-one-out
  // values, which amplifies rounding by about |mean|/error·sqrt(bins) ≈ 1e3–1e4: 1e-9 relative.
  const close = (a: number, b: number) => expect(Math.abs(a - b)).toBeLessThanOrEqual(1e-12 * Math.abs(b));
  const closeError = (a: number, b: number) => expect(Math.abs(a - b)).toBeLessThanOrEqual(1e-9 * Math.abs(b));

  it("equals the library's blocked jackknife on the raw series with the same cut and bin size (to rounding)", () => {
    expect(fits.get("m2")!.cut).toBeGreaterThan(0);
    const u4 = binderCumulant(m2, m4, rule(["m2", "m4"]));
    close(out.get("U4")!.mean, u4.mean);
    closeError(out.get("U4")!.error, u4.error);
    expect(out.get("U4")).toMatchObject({ binSize: u4.binSize, n: u4.n, nBins: u4.nBins, cut: { index: u4.cut.index, rule: "mser-5" } });
    const chi = susceptibility(absM, m2, { sites: 64, temperature: 2.3 }, rule(["absM", "m2"]));
    close(out.get("chi")!.mean, chi.mean);
    closeError(out.get("chi")!.error, chi.error);
    const c = specificHeat(e, { sites: 64, temperature: 2.3 }, rule(["e"], (cut) => [gammaMethod(e.map((v) => v * v).subarray(cut)).tauInt]));
    close(out.get("C")!.mean, c.mean);
    closeError(out.get("C")!.error, c.error);
    expect(out.get("C")!.binSize).toBe(c.binSize);
  });
});
