import { describe, expect, it } from "vitest";
import * as A from "@/lib/analysis";
import { AnalysisError, type AnalysisErrorCode } from "@/lib/analysis";
import { normals } from "./support";

/** Asserts that fn throws an AnalysisError with this code and a message matching `where`. */
function rejects(fn: () => unknown, code: AnalysisErrorCode, where: RegExp) {
  let caught: unknown;
  try {
    fn();
  } catch (e) {
    caught = e;
  }
  expect(caught, "expected an AnalysisError").toBeInstanceOf(AnalysisError);
  expect((caught as AnalysisError).code).toBe(code);
  expect((caught as AnalysisError).message).toMatch(where);
}

const ok = normals(200, 1);
const withNaN = Float64Array.from(ok);
withNaN[37] = NaN;
const withInf = Float64Array.from(ok);
withInf[5] = -Infinity;
const empty = new Float64Array(0);

// Every function that takes a series, wrapped to take just that series.
const seriesFunctions: Record<string, (x: Float64Array) => unknown> = {
  autocovariance: (x) => A.autocovariance(x, 1),
  gammaMethod: (x) => A.gammaMethod(x),
  estimateSeries: (x) => A.estimateSeries(x),
  mserCut: (x) => A.mserCut(x),
  blockingAnalysis: (x) => A.blockingAnalysis(x),
  jackknife: (x) => A.jackknife([x], ([m]) => m),
  binderCumulant: (x) => A.binderCumulant(x, ok),
  susceptibility: (x) => A.susceptibility(ok, x, { sites: 4, temperature: 1 }),
  specificHeat: (x) => A.specificHeat(x, { sites: 4, temperature: 1 }),
  prepareSpectrum: (x) => A.prepareSpectrum(x, "spectrum"),
  countingFunction: (x) => A.countingFunction(x, new Float64Array([1])),
  weylFit: (x) => A.weylFit(x),
  heatKernel: (x) => A.heatKernel(x),
};

describe("bad input throws AnalysisError with what and where, never NaN", () => {
  for (const [name, fn] of Object.entries(seriesFunctions)) {
    it(`${name}: empty, NaN, Infinity and non-Float64Array inputs`, () => {
      rejects(() => fn(empty), "EMPTY_SERIES", /empty/);
      rejects(() => fn(withNaN), "NON_FINITE", /entry 37 is NaN/);
      rejects(() => fn(withInf), "NON_FINITE", /entry 5 is -Infinity/);
      rejects(() => fn([1, 2, 3] as unknown as Float64Array), "NOT_FLOAT64", /Float64Array, got Array/);
    });
  }

  it("series too short for each method say how many points they need", () => {
    const one = new Float64Array([1]);
    rejects(() => A.autocovariance(one, 0), "TOO_SHORT", /needs at least 2/);
    rejects(() => A.gammaMethod(new Float64Array(9)), "TOO_SHORT", /needs at least 10/);
    rejects(() => A.estimateSeries(new Float64Array(19)), "TOO_SHORT", /needs at least 20/);
    rejects(() => A.estimateSeries(ok, { cut: 195 }), "INVALID_OPTION", /cut: must be an integer in \[0, 190\]/);
    rejects(() => A.mserCut(new Float64Array(19)), "TOO_SHORT", /needs at least 20/);
    rejects(() => A.blockingAnalysis(new Float64Array(63)), "TOO_SHORT", /needs at least 64/);
    rejects(() => A.jackknife([one], ([m]) => m, { cut: 0 }), "TOO_SHORT", /needs at least 2/);
    rejects(() => A.jackknife([ok], ([m]) => m, { cut: 0, binSize: 150 }), "INVALID_OPTION", /binSize/);
  });

  it("options out of range are named", () => {
    rejects(() => A.autocovariance(ok, 200), "INVALID_OPTION", /maxLag.*\[0, 199\]/);
    rejects(() => A.gammaMethod(ok, { S: 0 }), "INVALID_OPTION", /gammaMethod\(S\)/);
    rejects(() => A.gammaMethod(ok, { window: "madras-sokal", c: -1 }), "INVALID_OPTION", /gammaMethod\(c\)/);
    rejects(() => A.gammaMethod(ok, { window: "bogus" as "wolff" }), "INVALID_OPTION", /window/);
    rejects(() => A.gammaMethod(ok, { acfLags: 1.5 }), "INVALID_OPTION", /acfLags/);
    rejects(() => A.estimateSeries(ok, { cut: -1 }), "INVALID_OPTION", /cut/);
    rejects(() => A.blockingAnalysis(ok, { minBlocks: 1 }), "INVALID_OPTION", /minBlocks/);
    rejects(() => A.paddedFftSize(0), "INVALID_OPTION", /paddedFftSize/);
    rejects(() => A.logGrid(0, 1, 5), "INVALID_OPTION", /logGrid\(min\)/);
    rejects(() => A.logGrid(1, 1, 5), "INVALID_OPTION", /logGrid\(max\)/);
    rejects(() => A.logGrid(1, 2, 1), "INVALID_OPTION", /logGrid\(n\)/);
    rejects(() => A.chi2Survival(-1, 2), "INVALID_OPTION", /chi2Survival\(chi2\)/);
    rejects(() => A.chi2Survival(1, 0), "INVALID_OPTION", /chi2Survival\(dof\)/);
  });

  it("jackknife: mismatched lengths, no series, and a derived function returning NaN", () => {
    rejects(() => A.jackknife([ok, new Float64Array(100)], ([a]) => a), "LENGTH_MISMATCH", /series\[1\]\): has 100 points, series\[0\] has 200/);
    rejects(() => A.jackknife([], () => 0), "EMPTY_SERIES", /non-empty array/);
    const zeros = new Float64Array(200);
    rejects(() => A.jackknife([ok, zeros], ([a, b]) => a / b, { cut: 0 }), "FUNCTION_NOT_FINITE", /returned (Infinity|-Infinity|NaN) on all data/);
    rejects(() => A.binderCumulant(zeros, zeros, { cut: 0 }), "FUNCTION_NOT_FINITE", /returned NaN/);
  });

  it("thermodynamic parameters must be positive", () => {
    rejects(() => A.susceptibility(ok, ok, { sites: 0, temperature: 1 }), "INVALID_OPTION", /sites/);
    rejects(() => A.susceptibility(ok, ok, { sites: 2.5, temperature: 1 }), "INVALID_OPTION", /sites/);
    rejects(() => A.specificHeat(ok, { sites: 4, temperature: 0 }), "INVALID_OPTION", /temperature/);
    rejects(() => A.specificHeat(ok, { sites: 4, temperature: NaN }), "INVALID_OPTION", /temperature/);
    rejects(() => A.specificHeat(ok, null as unknown as A.ThermoParams), "INVALID_OPTION", /sites, temperature/);
  });

  it("combineReplicas: empty, non-finite, zero error, bad threshold", () => {
    rejects(() => A.combineReplicas([]), "EMPTY_SERIES", /at least one/);
    rejects(() => A.combineReplicas([{ mean: 1, error: 1 }, { mean: NaN, error: 1 }]), "NON_FINITE", /replicas\[1\]/);
    rejects(() => A.combineReplicas([{ mean: 1, error: 0 }]), "ZERO_ERROR", /replicas\[0\]\): error must be > 0/);
    rejects(() => A.combineReplicas([{ mean: 1, error: -1 }]), "ZERO_ERROR", /replicas\[0\]/);
    rejects(() => A.combineReplicas([{ mean: 1, error: 1 }], { threshold: 1 }), "INVALID_OPTION", /threshold/);
  });

  it("spectra: negative eigenvalues (with index), bad σ, degenerate windows", () => {
    const eig = new Float64Array([0, 1, -0.5, 2]);
    rejects(() => A.heatKernel(eig), "NEGATIVE_EIGENVALUE", /eigenvalue 2 is -0.5/);
    rejects(() => A.weylFit(eig), "NEGATIVE_EIGENVALUE", /eigenvalue 2/);
    rejects(() => A.countingFunction(eig, new Float64Array([1])), "NEGATIVE_EIGENVALUE", /eigenvalue 2/);
    rejects(() => A.countingFunction(ok.map(Math.abs), new Float64Array([NaN])), "NON_FINITE", /countingFunction\(at\): entry 0/);
    const good = new Float64Array([0, 1, 2, 3]);
    rejects(() => A.heatKernel(good, { sigma: new Float64Array([1, 0]) }), "INVALID_SIGMA", /entry 1 is 0/);
    rejects(() => A.heatKernel(good, { sigma: new Float64Array([-2]) }), "INVALID_SIGMA", /entry 0 is -2/);
    rejects(() => A.heatKernel(good, { sigmaMin: -1 }), "INVALID_SIGMA", /sigmaMin/);
    rejects(() => A.heatKernel(good, { sigmaMin: 5, sigmaMax: 1 }), "INVALID_SIGMA", /must exceed/);
    rejects(() => A.heatKernel(new Float64Array([0, 0])), "DEGENERATE", /every eigenvalue is zero/);
    rejects(() => A.heatKernel(good, { zeroTolerance: -1 }), "INVALID_OPTION", /zeroTolerance/);
    rejects(() => A.weylFit(good), "DEGENERATE", /only 3 distinct|only \d distinct/);
    rejects(() => A.weylFit(good, { window: [0, 1] }), "INVALID_OPTION", /window\[0\]/);
    rejects(() => A.weylFit(good, { window: [2, 1] }), "INVALID_OPTION", /window\[1\]/);
  });

  it("a perfectly alternating series (summed autocovariance ≤ 0) is rejected, not given an imaginary error", () => {
    const alt = Float64Array.from({ length: 100 }, (_, i) => (i % 2 ? 1 : -1));
    rejects(() => A.gammaMethod(alt), "DEGENERATE", /summed autocovariance .* ≤ 0 at W = 1/);
  });

  it("degenerate series: constant is reported (zero error, warning), never NaN", () => {
    const e = A.estimateSeries(new Float64Array(100).fill(3));
    expect(e.mean).toBe(3);
    expect(Number.isNaN(e.error)).toBe(false);
    expect(e.warnings.length).toBeGreaterThan(0);
  });
});
