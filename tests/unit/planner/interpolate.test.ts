// Interpolation across parameters: tau_int log-linear, variance and cost linear, extrapolation flagged.
import { describe, expect, it } from "vitest";
import { locate } from "@/lib/planner/interpolate";
import { planFromMeasured } from "@/lib/planner/plan";
import type { MeasuredPoint, PointStats } from "@/lib/planner/types";

const stats = (tauSweeps: number, variance: number, secondsPerSweep: number | null = 0.01): PointStats =>
  ({ tauSweeps, variance, relUncertainty: 0.05, secondsPerSweep, overheadSeconds: 0, cutSweeps: 0, minN: 10_000, chains: 2 });
const at = (T: number, s: PointStats, L = 8): MeasuredPoint => ({ params: { L, T, algorithm: "metropolis" }, stats: s, chains: [] });
const measured = [at(2.0, stats(2, 1, 0.01)), at(3.0, stats(8, 3, 0.03)), at(2.5, stats(1, 1), 16)];

describe("locate", () => {
  it("uses a measured point as it is", () => {
    const l = locate({ L: 8, T: 3, algorithm: "metropolis" }, measured)!;
    expect(l.derivation).toEqual({ kind: "measured" });
    expect(l.stats.tauSweeps).toBe(8);
  });

  it("between two measured values: tau_int geometric (log-linear), variance and seconds per sweep linear", () => {
    const l = locate({ L: 8, T: 2.5, algorithm: "metropolis" }, measured)!;
    expect(l.derivation).toMatchObject({ kind: "interpolated", param: "T", from: [2, 3] });
    expect(l.stats.tauSweeps).toBeCloseTo(4, 12); // exp(½ ln 2 + ½ ln 8)
    expect(l.stats.variance).toBeCloseTo(2, 12);
    expect(l.stats.secondsPerSweep).toBeCloseTo(0.02, 12);
    expect(l.warnings.join(" ")).toMatch(/factor 4\.0/); // tau_int quadruples across the gap
  });

  it("beyond the measured range: the nearest point, flagged as extrapolated", () => {
    const l = locate({ L: 8, T: 3.5, algorithm: "metropolis" }, measured)!;
    expect(l.derivation).toEqual({ kind: "extrapolated", param: "T", nearest: 3 });
    expect(l.warnings[0]).toMatch(/^extrapolated: no measured T above 3.5/);
  });

  it("nothing when two parameters differ or a string parameter does", () => {
    expect(locate({ L: 32, T: 2.7, algorithm: "metropolis" }, measured)).toBeNull();
    expect(locate({ L: 8, T: 2.0, algorithm: "wolff" }, measured)).toBeNull();
  });
});

describe("planFromMeasured over a scan", () => {
  it("every point gets the largest need; a point without a neighbour is refused by name", () => {
    const req = { sampler: "ising2d", observable: "e", targetError: 0.01, replicas: 2, points: [2.0, 2.5, 3.0].map((T) => ({ L: 8, T, algorithm: "metropolis" })) };
    const plan = planFromMeasured(req, measured, [1], [100]);
    const needs = plan.points.map((p) => p.measurementsNeeded);
    expect(needs).toEqual([20_000, 80_000, 240_000]); // 2·τ·σ²/(R·t²) with (τ, σ²) = (2, 1), (4, 2), (8, 3)
    expect(plan.measurements).toBe(240_000);
    expect(plan.points[0].predictedError).toBeCloseTo(0.01 * Math.sqrt(20_000 / 240_000), 12);
    expect(plan.request.thermalization).toBe(100);
    expect(() => planFromMeasured({ ...req, points: [{ L: 64, T: 2.7, algorithm: "metropolis" }] }, measured, [1], [0])).toThrow(/no earlier estimates of ising2d\/e agree with L=64, T=2.7, algorithm=metropolis/);
  });
});
