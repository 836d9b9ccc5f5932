// The planner's formula: error² ≈ 2·tau_int·variance / N, and the stats of a point from its pilot chains.
import { AppError } from "@/lib/errors";
import type { PilotChain, PointStats } from "./types";

/**
 * Conventions (Madras & Sokal 1988; Wolff 2004): tau_int = ½ + Σ_{t≥1} ρ(t), with t in units of
 * the measurement interval; variance = Γ(0) of one measurement; N measurements after the cut.
 * The error of the mean of one chain is then sqrt(2·tau_int·Γ(0)/N), and R independent replicas
 * combined by inverse variance divide error² by R.
 */
export const CONVENTIONS = [
  "tau_int = 1/2 + Σ_{t≥1} ρ(t), t counted in measurement intervals (Madras & Sokal 1988; Wolff 2004): an uncorrelated series has tau_int = 1/2",
  "variance = Γ(0), the variance of a single measurement of the observable",
  "N = measurements per replica after the thermalisation cut; error² of a point ≈ 2·tau_int·variance / (replicas·N)",
];

function positive(x: number, what: string): void {
  if (!Number.isFinite(x) || x <= 0) throw new AppError("invalid", `${what} must be a finite number > 0, got ${x}`);
}

/** Measurements per replica (after the cut) that bring the point's error to `targetError`: ceil(2τσ²/(R·t²)). */
export function measurementsForTarget(a: { tauInt: number; variance: number; targetError: number; replicas: number }): number {
  positive(a.tauInt, "tauInt"); positive(a.variance, "variance"); positive(a.targetError, "targetError"); positive(a.replicas, "replicas");
  const n = (2 * a.tauInt * a.variance) / (a.replicas * a.targetError * a.targetError);
  // the ratio can land a rounding error above an integer (e.g. 400.00000000000006): that is 400
  return Math.max(1, Math.ceil(n * (1 - 1e-12)));
}

/** The error of a point after `measurements` per replica: sqrt(2τσ²/(R·N)). */
export function errorAfter(a: { tauInt: number; variance: number; replicas: number; measurements: number }): number {
  positive(a.tauInt, "tauInt"); positive(a.variance, "variance"); positive(a.replicas, "replicas"); positive(a.measurements, "measurements");
  return Math.sqrt((2 * a.tauInt * a.variance) / (a.replicas * a.measurements));
}

/**
 * Γ(0) of a chain from its stored estimate: the Gamma method sets error² = 2·tau_int·Γ(0)/n
 * (lib/analysis/gamma.ts), so Γ(0) = error²·n/(2·tau_int) recovers it exactly.
 */
export function chainVariance(c: Pick<PilotChain, "error" | "n" | "tauInt">): number {
  return (c.error * c.error * c.n) / (2 * c.tauInt);
}

/**
 * Relative uncertainty of a chain's 2·tau_int·Γ(0) = n·error²: twice the relative error-of-error
 * sqrt((W + ½)/n) of Wolff 2004. Without a window (jackknife-derived observables) W ≈ 6·tau_int is
 * assumed, the Madras–Sokal self-consistent window with c = 6 (common practice).
 */
export function chainRelUncertainty(c: Pick<PilotChain, "n" | "tauInt" | "window">): number {
  const W = c.window ?? Math.ceil(6 * c.tauInt);
  return 2 * Math.sqrt((W + 0.5) / c.n);
}

/**
 * Combine the pilot chains at one point: tau_int (in sweeps) and Γ(0) averaged over chains, the
 * uncertainty of their product the larger of the error-of-error propagated (÷√chains) and the
 * chains' own scatter of n·error² (÷√chains, from 3 chains on); the cost per sweep from timing().
 */
export function pointStats(chains: PilotChain[]): PointStats {
  if (chains.length === 0) throw new AppError("invalid", "pointStats: no pilot chains");
  const k = chains.length;
  for (const c of chains) {
    if (!(c.tauInt > 0) || !(c.error > 0) || !(c.n > 0)) {
      throw new AppError("invalid", `estimate ${c.estimateId} (run ${c.runId}) has tau_int ${c.tauInt}, error ${c.error}, n ${c.n}: the planner needs all three > 0`);
    }
  }
  const mean = (xs: number[]) => xs.reduce((a, b) => a + b, 0) / xs.length;
  const tauSweeps = mean(chains.map((c) => c.tauInt * c.interval));
  const variance = mean(chains.map(chainVariance));
  const propagated = Math.sqrt(mean(chains.map((c) => chainRelUncertainty(c) ** 2)) / k);
  let scatter = 0;
  if (k >= 3) {
    const cf = chains.map((c) => c.n * c.error * c.error * c.interval); // 2·tau_sweeps·Γ(0)
    const m = mean(cf);
    const sd = Math.sqrt(cf.reduce((a, x) => a + (x - m) ** 2, 0) / (k - 1));
    scatter = sd / m / Math.sqrt(k);
  }
  const { secondsPerSweep, overheadSeconds } = timing(chains);
  return {
    tauSweeps, variance, relUncertainty: Math.max(propagated, scatter), secondsPerSweep, overheadSeconds,
    cutSweeps: mean(chains.map((c) => c.thermCut * c.interval)), minN: Math.min(...chains.map((c) => c.n)), chains: k,
  };
}

/**
 * Wall time per run as overhead + secondsPerSweep × sweeps. When the timed chains ran lengths at
 * least 1.5× apart, a least-squares line gives both (overhead clamped at ≥ 0, refitted through the
 * origin if negative); otherwise the median of wall ÷ sweeps, with the start-up inside it.
 */
export function timing(chains: PilotChain[]): { secondsPerSweep: number | null; overheadSeconds: number } {
  const timed = chains.filter((c) => c.wallSeconds !== null && c.sweeps !== null && c.sweeps > 0 && c.wallSeconds > 0);
  if (!timed.length) return { secondsPerSweep: null, overheadSeconds: 0 };
  const xs = timed.map((c) => c.sweeps!), ys = timed.map((c) => c.wallSeconds!);
  if (Math.max(...xs) >= 1.5 * Math.min(...xs)) {
    const mx = xs.reduce((a, b) => a + b, 0) / xs.length, my = ys.reduce((a, b) => a + b, 0) / ys.length;
    const sxy = xs.reduce((a, x, i) => a + (x - mx) * (ys[i] - my), 0), sxx = xs.reduce((a, x) => a + (x - mx) ** 2, 0);
    const slope = sxy / sxx, overhead = my - slope * mx;
    if (slope > 0 && overhead >= 0) return { secondsPerSweep: slope, overheadSeconds: overhead };
    const through = xs.reduce((a, x, i) => a + x * ys[i], 0) / xs.reduce((a, x) => a + x * x, 0);
    return { secondsPerSweep: through, overheadSeconds: 0 };
  }
  const rates = timed.map((c) => c.wallSeconds! / c.sweeps!).sort((a, b) => a - b);
  const mid = rates.length / 2;
  return { secondsPerSweep: rates.length % 2 ? rates[(rates.length - 1) / 2] : (rates[mid - 1] + rates[mid]) / 2, overheadSeconds: 0 };
}
