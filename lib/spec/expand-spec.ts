// A spec's scan expanded into parameter points (cartesian product) and runs with their seeds.
import { deriveSeed } from "./seeds";
import type { EnsembleSpec, ParamValue, ScanAxis } from "./schema";

/** One parameter point: its 0-based index and the sampler parameters there (fixed + scanned). */
export type ExpandedPoint = { index: number; params: Record<string, ParamValue> };
/** One run: its point, replica number and seed. */
export type ExpandedRun = { pointIndex: number; replica: number; seed: string };

// 12 significant digits: 2.0 + 3·0.1 reads 2.3, not 2.3000000000000003, and 8·2^(1/1) reads 16.
const tidy = (x: number) => Number(x.toPrecision(12));

/** The values of one scan axis, in order (linear and log include both ends). */
export function axisValues(axis: ScanAxis): ParamValue[] {
  if ("values" in axis) return axis.values;
  if ("linear" in axis) {
    const { from, to, points } = axis.linear;
    return Array.from({ length: points }, (_, k) => (k === points - 1 ? to : tidy(from + ((to - from) * k) / (points - 1))));
  }
  const { from, to, points } = axis.log;
  const ratio = Math.log(to / from);
  return Array.from({ length: points }, (_, k) => (k === points - 1 ? to : tidy(from * Math.exp((ratio * k) / (points - 1)))));
}

/** Number of points of a spec's scan, without expanding it. */
export function pointCount(spec: Pick<EnsembleSpec, "scan">): number {
  return spec.scan.reduce((n, axis) => n * axisValues(axis).length, 1);
}

/**
 * For each point (in index order) the position of its value on every axis; the last axis varies
 * fastest, like nested loops written in the order of the scan list.
 */
export function axisPositions(sizes: readonly number[]): number[][] {
  const total = sizes.reduce((a, b) => a * b, 1);
  return Array.from({ length: total }, (_, index) => {
    const pos = new Array<number>(sizes.length);
    let rest = index;
    for (let d = sizes.length - 1; d >= 0; d--) {
      pos[d] = rest % sizes[d];
      rest = Math.floor(rest / sizes[d]);
    }
    return pos;
  });
}

/** Expand a (validated) spec into points × replicas, seeds derived with deriveSeed. */
export function expandSpec(spec: EnsembleSpec): { points: ExpandedPoint[]; runs: ExpandedRun[] } {
  const values = spec.scan.map(axisValues);
  const points = axisPositions(values.map((v) => v.length)).map((pos, index) => {
    const params: Record<string, ParamValue> = { ...spec.fixed };
    spec.scan.forEach((axis, d) => { params[axis.param] = values[d][pos[d]]; });
    return { index, params };
  });
  const runs: ExpandedRun[] = [];
  for (const p of points) {
    for (let replica = 0; replica < spec.replicas; replica++) runs.push({ pointIndex: p.index, replica, seed: deriveSeed(spec.seed, p.index, replica) });
  }
  return { points, runs };
}
