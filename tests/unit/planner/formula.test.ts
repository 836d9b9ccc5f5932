// The planner's prediction on AR(1) series, whose tau_int and variance are known exactly:
// x_t = φ x_{t−1} + ε_t, ρ(t) = φ^t, so tau_int = ½(1+φ)/(1−φ) in the ½ + Σρ convention
// (Madras & Sokal 1988; Wolff 2004) and Var(x) = σ_ε²/(1−φ²).
import { describe, expect, it } from "vitest";
import { estimateSeries } from "@/lib/analysis";
import { errorAfter, measurementsForTarget, timing } from "@/lib/planner/formula";
import { measuredPoints } from "@/lib/planner/measured-points";
import { planFromMeasured } from "@/lib/planner/plan";
import type { PilotChain, PlanRequest } from "@/lib/planner/types";
import { ar1, ar1TauInt } from "../analysis/support";

const PHI = 0.8;
const TAU = ar1TauInt(PHI); // 4.5
const VAR = 1 / (1 - PHI * PHI); // σ_ε = 1
const TARGET = 0.01;
const R = 4;
const EXACT_N = (2 * TAU * VAR) / (R * TARGET * TARGET); // 62,500

const req = (over: Partial<PlanRequest> = {}): PlanRequest => ({ sampler: "ar1", observable: "x", targetError: TARGET, replicas: R, points: [{ phi: PHI }], ...over });

/** A chain whose stored estimate carries the exact tau_int and variance (error² = 2τσ²/n). */
function exactChain(n: number, over: Partial<PilotChain> = {}): PilotChain {
  return {
    estimateId: `e${n}`, runId: `r${n}`, ensembleId: "pilot", params: { phi: PHI }, mean: 0, error: Math.sqrt((2 * TAU * VAR) / n), tauInt: TAU, n,
    window: 27, thermCut: 0, interval: 1, sweeps: n, wallSeconds: n * 0.002, cores: 1, ...over,
  };
}

/** A chain from a simulated AR(1) series through the same estimator the importer uses. */
function simulatedChain(n: number, seed: number): PilotChain {
  const e = estimateSeries(ar1(n, PHI, seed));
  return { ...exactChain(n), estimateId: `s${seed}`, runId: `s${seed}`, error: e.error, tauInt: e.tauInt, n: e.n, window: e.window, thermCut: e.cut.index };
}

describe("the formula error² = 2·tau_int·variance/(R·N)", () => {
  it("fed the exact AR(1) tau_int and variance, the plan needs exactly ceil(2τσ²/(R·t²)) measurements (Madras & Sokal 1988)", () => {
    const plan = planFromMeasured(req(), measuredPoints([exactChain(10_000), exactChain(20_000)]), [1], [0]);
    const p = plan.points[0];
    expect(p.tauInt).toBeCloseTo(TAU, 12);
    expect(p.variance).toBeCloseTo(VAR, 12);
    expect(p.measurementsNeeded).toBe(Math.ceil(EXACT_N - 1e-6));
    expect(plan.measurements).toBe(p.measurementsNeeded); // no thermalisation cut in the pilots, so nothing added
    expect(p.predictedError).toBeCloseTo(TARGET, 10);
    // the inverse: N measurements give exactly the target back
    expect(errorAfter({ tauInt: TAU, variance: VAR, replicas: R, measurements: EXACT_N })).toBeCloseTo(TARGET, 14);
    expect(measurementsForTarget({ tauInt: 0.5, variance: 1, targetError: 0.1, replicas: 1 })).toBe(100); // uncorrelated: σ²/t²
  });

  it("prices the ensemble as replicas × points × cores × seconds per sweep × sweeps", () => {
    const plan = planFromMeasured(req({ points: [{ phi: PHI }, { phi: PHI }], cores: 2, thermalization: 500 }), measuredPoints([exactChain(10_000)]), [1], [0]);
    expect(plan.sweepsPerReplica).toBe(500 + plan.measurements);
    expect(plan.points[0].secondsPerSweep).toBeCloseTo(0.002, 15);
    expect(plan.coreHours).toBeCloseTo((2 * R * 2 * 0.002 * plan.sweepsPerReplica) / 3600, 12);
    expect(plan.wallMinutes).toBe(Math.ceil((1.5 * 0.002 * plan.sweepsPerReplica) / 60));
    expect(plan.reservationCoreHours).toBeCloseTo((plan.runs * 2 * plan.wallMinutes!) / 60, 12);
  });

  it("separates start-up from the cost per sweep when the chains ran different lengths (least squares)", () => {
    // wall = 2 s + 0.001 s × sweeps, exactly
    const chains = [1000, 4000, 16000].map((n) => exactChain(n, { sweeps: n, wallSeconds: 2 + 0.001 * n }));
    const t = timing(chains);
    expect(t.secondsPerSweep).toBeCloseTo(0.001, 12);
    expect(t.overheadSeconds).toBeCloseTo(2, 9);
    // equal lengths cannot separate the two: the median of wall ÷ sweeps, start-up included
    expect(timing([exactChain(1000, { wallSeconds: 3 }), exactChain(1000, { wallSeconds: 5 })])).toEqual({ secondsPerSweep: 0.004, overheadSeconds: 0 });
    const plan = planFromMeasured(req({ thermalization: 0 }), measuredPoints(chains), [1], [0]);
    expect(plan.points[0].secondsPerRun).toBeCloseTo(2 + 0.001 * plan.sweepsPerReplica, 9);
  });

  it("converts tau_int between measurement intervals through sweeps, and warns that it did", () => {
    const chain = exactChain(10_000, { interval: 2, sweeps: 20_000 }); // tau_int 4.5 measurements = 9 sweeps
    const plan = planFromMeasured(req({ interval: 3 }), measuredPoints([chain]), [2], [0]);
    expect(plan.points[0].tauInt).toBeCloseTo(3, 12);
    expect(plan.warnings.join(" ")).toMatch(/interval \(3\) differs/);
  });

  it("adds the pilots' thermalisation cut to the measurements and says so", () => {
    const plan = planFromMeasured(req(), measuredPoints([exactChain(10_000, { thermCut: 300 }), exactChain(10_000, { thermCut: 100 })]), [1], [1000]);
    expect(plan.cutAllowance).toBe(200);
    expect(plan.measurements).toBe(plan.points[0].measurementsNeeded + 200);
    expect(plan.sweepsPerReplica).toBe(1000 + plan.measurements);
    expect(plan.warnings.join(" ")).toMatch(/thermalisation added: 200/);
  });

  it("refuses bad input by name instead of answering NaN", () => {
    expect(() => measurementsForTarget({ tauInt: TAU, variance: VAR, targetError: 0, replicas: 1 })).toThrow(/targetError must be a finite number > 0/);
    expect(() => planFromMeasured(req(), measuredPoints([exactChain(1000, { tauInt: 0 })]), [1], [0])).toThrow(/tau_int 0/);
  });
});

describe("fed estimates from simulated AR(1) pilot chains", () => {
  it("predicts the exact need within its own stated uncertainty (3σ)", () => {
    const chains = [1, 2, 3, 4].map((s) => simulatedChain(20_000, 100 + s));
    const plan = planFromMeasured(req(), measuredPoints(chains), [1], [0]);
    const p = plan.points[0];
    const sigma = p.relUncertainty * p.measurementsNeeded;
    // the stated uncertainty is meaningful, not a blanket: 4 chains × 20,000 points → a few per cent
    expect(p.relUncertainty).toBeGreaterThan(0.01);
    expect(p.relUncertainty).toBeLessThan(0.1);
    expect(Math.abs(p.measurementsNeeded - EXACT_N)).toBeLessThan(3 * sigma);
  });

  it("its stated uncertainty is calibrated: over 40 pilots about 68 % land within 1σ and nearly all within 2σ", () => {
    let in1 = 0, in2 = 0;
    const trials = 40;
    for (let t = 0; t < trials; t++) {
      const chains = [0, 1].map((s) => simulatedChain(5_000, 1000 + 2 * t + s));
      const p = planFromMeasured(req(), measuredPoints(chains), [1], [0]).points[0];
      const z = Math.abs(p.measurementsNeeded - EXACT_N) / (p.relUncertainty * p.measurementsNeeded);
      if (z <= 1) in1++;
      if (z <= 2) in2++;
    }
    // binomial(40, 0.68) has sd ≈ 3; the bounds leave about 3σ either side for a calibrated error bar,
    // while an error bar 2× too small (in1 ≈ 15) or 2× too large (in1 ≈ 38) fails
    expect(in1).toBeGreaterThanOrEqual(18);
    expect(in1).toBeLessThanOrEqual(36);
    expect(in2).toBeGreaterThanOrEqual(32);
  });
});
