// Stats at a requested parameter point from the measured ones: exact match, interpolation along one
// numeric parameter (tau_int log-linear, variance and seconds per sweep linear), or flat extrapolation.
import type { ParamValue } from "@/lib/spec/schema";
import type { Derivation, MeasuredPoint, PointStats } from "./types";

/** Stats at a point, how they were obtained, and the measured points they came from. */
export type Located = { stats: PointStats; derivation: Derivation; sources: MeasuredPoint[]; warnings: string[] };

const same = (a: ParamValue | undefined, b: ParamValue | undefined) =>
  typeof a === "number" && typeof b === "number" ? Math.abs(a - b) <= 1e-9 * Math.max(1, Math.abs(a), Math.abs(b)) : a === b;

/** True when `p` and `q` agree on every key of either, except `except`. */
function agreeExcept(p: Record<string, ParamValue>, q: Record<string, ParamValue>, except: string | null): boolean {
  const keys = new Set([...Object.keys(p), ...Object.keys(q)]);
  for (const k of keys) if (k !== except && !same(p[k], q[k])) return false;
  return true;
}

/** Describe a point as "L=8, T=2.3". */
export function describeParams(p: Record<string, ParamValue>): string {
  return Object.entries(p).map(([k, v]) => `${k}=${v}`).join(", ");
}

const lerp = (x0: number, y0: number, x1: number, y1: number, x: number) => y0 + ((y1 - y0) * (x - x0)) / (x1 - x0);

/**
 * The stats at `target`, or null when no measured point agrees with it in all parameters but at
 * most one numeric one. Along that parameter the nearest measured values below and above bracket
 * the target: log tau_int, variance and seconds per sweep are interpolated linearly in it (tau_int
 * grows roughly exponentially towards a transition, so its log is the smoother function); the
 * uncertainty is the larger of the two neighbours'. With neighbours on one side only the nearest
 * is used as it is, and the result is flagged as extrapolated.
 */
export function locate(target: Record<string, ParamValue>, measured: MeasuredPoint[]): Located | null {
  const exact = measured.find((m) => agreeExcept(target, m.params, null));
  if (exact) return { stats: exact.stats, derivation: { kind: "measured" }, sources: [exact], warnings: [] };

  type Option = { param: string; below?: MeasuredPoint; above?: MeasuredPoint; distance: number };
  const options: Option[] = [];
  for (const [param, value] of Object.entries(target)) {
    if (typeof value !== "number") continue;
    const along = measured.filter((m) => typeof m.params[param] === "number" && agreeExcept(target, m.params, param));
    if (!along.length) continue;
    const below = along.filter((m) => (m.params[param] as number) < value).sort((a, b) => (b.params[param] as number) - (a.params[param] as number))[0];
    const above = along.filter((m) => (m.params[param] as number) > value).sort((a, b) => (a.params[param] as number) - (b.params[param] as number))[0];
    const distance = Math.min(...along.map((m) => Math.abs((m.params[param] as number) - value))) / Math.max(Math.abs(value), 1e-12);
    options.push({ param, below, above, distance });
  }
  if (!options.length) return null;
  // a bracket beats a one-sided neighbour; among equals the relatively nearest wins
  options.sort((a, b) => Number(!!(b.below && b.above)) - Number(!!(a.below && a.above)) || a.distance - b.distance);
  const best = options[0];
  const x = target[best.param] as number;
  if (best.below && best.above) {
    const x0 = best.below.params[best.param] as number, x1 = best.above.params[best.param] as number;
    const s0 = best.below.stats, s1 = best.above.stats;
    const warnings: string[] = [];
    const ratio = Math.max(s0.tauSweeps, s1.tauSweeps) / Math.min(s0.tauSweeps, s1.tauSweeps);
    if (ratio > 2) warnings.push(`tau_int changes by a factor ${ratio.toFixed(1)} between ${best.param}=${x0} and ${best.param}=${x1}: the interpolation at ${best.param}=${x} is uncertain (a transition nearby?); a pilot there is safer`);
    const stats: PointStats = {
      tauSweeps: Math.exp(lerp(x0, Math.log(s0.tauSweeps), x1, Math.log(s1.tauSweeps), x)),
      variance: lerp(x0, s0.variance, x1, s1.variance, x),
      relUncertainty: Math.max(s0.relUncertainty, s1.relUncertainty),
      secondsPerSweep: s0.secondsPerSweep !== null && s1.secondsPerSweep !== null ? lerp(x0, s0.secondsPerSweep, x1, s1.secondsPerSweep, x) : s0.secondsPerSweep ?? s1.secondsPerSweep,
      overheadSeconds: Math.max(s0.overheadSeconds, s1.overheadSeconds),
      cutSweeps: Math.max(s0.cutSweeps, s1.cutSweeps),
      minN: Math.min(s0.minN, s1.minN),
      chains: s0.chains + s1.chains,
    };
    return { stats, derivation: { kind: "interpolated", param: best.param, from: [x0, x1], tau: "log-linear", variance: "linear" }, sources: [best.below, best.above], warnings };
  }
  const near = (best.below ?? best.above)!;
  const at = near.params[best.param] as number;
  return {
    stats: near.stats, derivation: { kind: "extrapolated", param: best.param, nearest: at }, sources: [near],
    warnings: [`extrapolated: no measured ${best.param} ${best.below ? "above" : "below"} ${x}; the figures of ${best.param}=${at} are used unchanged for ${describeParams(target)}`],
  };
}
