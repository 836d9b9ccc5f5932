import { AnalysisError, assertOption, assertSeries } from "./errors";

/** A validated spectrum: distinct eigenvalues ascending with their multiplicities. */
export interface PreparedSpectrum {
  /** Distinct eigenvalues, ascending; zero modes (|λ| ≤ zeroTolerance) are exactly 0. */
  values: Float64Array;
  /** Multiplicity of each distinct value. */
  multiplicity: Float64Array;
  /** Total number of eigenvalues (with multiplicity). */
  size: number;
  zeroModes: number;
}

/** Options shared by the spectral functions. */
export interface SpectrumOptions {
  /** Eigenvalues with |λ| ≤ this count as zero modes (default 0: only exact zeros). */
  zeroTolerance?: number;
}

/**
 * Validates and sorts a spectrum (array of eigenvalues of a non-negative operator such as a
 * Laplacian). Input: non-empty finite Float64Array, every λ ≥ −zeroTolerance; tiny round-off
 * negatives within the tolerance become zero modes. Degenerate values are merged, which makes
 * lattice spectra (highly degenerate) cheap to sum over.
 */
export function prepareSpectrum(eigenvalues: Float64Array, what: string, options: SpectrumOptions = {}): PreparedSpectrum {
  assertSeries(eigenvalues, what);
  const tol = options.zeroTolerance ?? 0;
  assertOption(tol, `${what} zeroTolerance`, "a finite number ≥ 0", (v) => v >= 0);
  for (let i = 0; i < eigenvalues.length; i++) {
    if (eigenvalues[i] < -tol) {
      throw new AnalysisError(
        "NEGATIVE_EIGENVALUE",
        `${what}: eigenvalue ${i} is ${eigenvalues[i]} < 0 (spectra must be non-negative; raise zeroTolerance for round-off)`,
      );
    }
  }
  const sorted = Float64Array.from(eigenvalues, (v) => (Math.abs(v) <= tol ? 0 : v)).sort();
  const values: number[] = [];
  const multiplicity: number[] = [];
  for (let i = 0; i < sorted.length; ) {
    let j = i;
    while (j < sorted.length && sorted[j] === sorted[i]) j++;
    values.push(sorted[i]);
    multiplicity.push(j - i);
    i = j;
  }
  return {
    values: Float64Array.from(values),
    multiplicity: Float64Array.from(multiplicity),
    size: sorted.length,
    zeroModes: values[0] === 0 ? multiplicity[0] : 0,
  };
}

/**
 * Counting function N(λ) = #{eigenvalues ≤ λ} (with multiplicity, zero modes included) at each
 * requested λ. Input: a spectrum and finite query points. Output: counts, same order as `at`.
 */
export function countingFunction(eigenvalues: Float64Array, at: Float64Array, options: SpectrumOptions = {}): Float64Array {
  const spec = prepareSpectrum(eigenvalues, "countingFunction(eigenvalues)", options);
  assertSeries(at, "countingFunction(at)");
  const cumulative = new Float64Array(spec.values.length);
  let acc = 0;
  for (let j = 0; j < spec.values.length; j++) cumulative[j] = acc += spec.multiplicity[j];
  return Float64Array.from(at, (lambda) => {
    // last index with value ≤ λ, by bisection
    let lo = 0;
    let hi = spec.values.length;
    while (lo < hi) {
      const mid = (lo + hi) >>> 1;
      if (spec.values[mid] <= lambda) lo = mid + 1;
      else hi = mid;
    }
    return lo === 0 ? 0 : cumulative[lo - 1];
  });
}
