// Seeded test data for the analysis tests (not a test file itself).
import { uniformFloat64 } from "pure-rand/distribution/uniformFloat64";
import { xoroshiro128plus } from "pure-rand/generator/xoroshiro128plus";

/** A seeded stream of standard normals by the Box–Muller transform (Box & Muller 1958). */
export function normalStream(seed: number): () => number {
  const rng = xoroshiro128plus(seed);
  let spare: number | undefined;
  return () => {
    if (spare !== undefined) {
      const s = spare;
      spare = undefined;
      return s;
    }
    // 1 − u lies in (0, 1], so the logarithm is finite.
    const r = Math.sqrt(-2 * Math.log(1 - uniformFloat64(rng)));
    const theta = 2 * Math.PI * uniformFloat64(rng);
    spare = r * Math.sin(theta);
    return r * Math.cos(theta);
  };
}

/** n independent N(mu, sd²) values. */
export function normals(n: number, seed: number, mu = 0, sd = 1): Float64Array {
  const next = normalStream(seed);
  const x = new Float64Array(n);
  for (let i = 0; i < n; i++) x[i] = mu + sd * next();
  return x;
}

/**
 * AR(1) x_t = φ x_{t−1} + ε_t with unit-variance ε, started from the stationary law
 * N(0, 1/(1−φ²)) so there is no transient.
 */
export function ar1(n: number, phi: number, seed: number): Float64Array {
  const next = normalStream(seed);
  const x = new Float64Array(n);
  x[0] = next() / Math.sqrt(1 - phi * phi);
  for (let t = 1; t < n; t++) x[t] = phi * x[t - 1] + next();
  return x;
}

/** Exact τ_int of AR(1): ρ(t) = φ^t, so τ_int = 1/2 + φ/(1−φ) = (1+φ)/(2(1−φ)) (Madras & Sokal 1988). */
export function ar1TauInt(phi: number): number {
  return (1 + phi) / (2 * (1 - phi));
}

/** Exact large-n standard error of the AR(1) mean: sqrt(Var(x)·2τ_int/n), Var(x) = 1/(1−φ²). */
export function ar1MeanError(phi: number, n: number): number {
  return Math.sqrt((2 * ar1TauInt(phi)) / ((1 - phi * phi) * n));
}

/**
 * Exact spectrum of the graph Laplacian of a periodic L^d lattice: Σ_i 4 sin²(π k_i/L) over all
 * k ∈ [0, L)^d (plane waves diagonalise it; standard result). One zero mode (k = 0).
 */
export function torusLaplacianSpectrum(d: number, L: number): Float64Array {
  const one = Array.from({ length: L }, (_, k) => 4 * Math.sin((Math.PI * k) / L) ** 2);
  let current = new Float64Array([0]);
  for (let dim = 0; dim < d; dim++) {
    const next = new Float64Array(current.length * L);
    let p = 0;
    for (const c of current) for (const e of one) next[p++] = c + e;
    current = next;
  }
  return current;
}
