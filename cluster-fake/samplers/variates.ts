/**
 * Non-uniform variates for the samplers, written here because pure-rand offers only
 * uniform distributions. Each keeps no hidden state (no cached second normal), so a
 * checkpoint needs nothing beyond the generator's own state.
 */
import { uniform01, type Rng } from "../../lib/samplers/rng";

/** Standard normal by the Box–Muller transform (Box & Muller 1958); the second variate is discarded. */
export function normal(rng: Rng): number {
  const u1 = 1 - uniform01(rng); // (0, 1], keeps log finite
  const u2 = uniform01(rng);
  return Math.sqrt(-2 * Math.log(u1)) * Math.cos(2 * Math.PI * u2);
}

/**
 * Gamma(shape, 1) by Marsaglia & Tsang (2000), "A simple method for generating gamma
 * variables": squeeze-and-reject on d·(1 + c·x)³ with d = shape − 1/3, c = 1/sqrt(9d).
 * For shape < 1 it uses their boost Gamma(shape) = Gamma(shape + 1)·U^(1/shape).
 */
export function gamma(rng: Rng, shape: number): number {
  if (!(shape > 0) || !Number.isFinite(shape)) throw new RangeError(`gamma shape must be > 0 (got ${shape})`);
  if (shape < 1) {
    const u = 1 - uniform01(rng);
    return gamma(rng, shape + 1) * Math.pow(u, 1 / shape);
  }
  const d = shape - 1 / 3;
  const c = 1 / Math.sqrt(9 * d);
  for (;;) {
    let x: number;
    let v: number;
    do {
      x = normal(rng);
      v = 1 + c * x;
    } while (v <= 0);
    v = v * v * v;
    const u = 1 - uniform01(rng);
    const x2 = x * x;
    if (u < 1 - 0.0331 * x2 * x2) return d * v;
    if (Math.log(u) < 0.5 * x2 + d * (1 - v + Math.log(v))) return d * v;
  }
}

/** Chi variate with k degrees of freedom (k may be non-integer): sqrt(2·Gamma(k/2)); χ_0 = 0. */
export function chi(rng: Rng, k: number): number {
  if (k === 0) return 0;
  return Math.sqrt(2 * gamma(rng, k / 2));
}
