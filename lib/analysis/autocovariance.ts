import FFT from "fft.js";
import { AnalysisError, assertSeries } from "./errors";

// fft.js builds a twiddle table and bit-reversal pattern per size; building them costs about as
// much as a transform, so instances are memoised per size. Only a handful of sizes ever occur.
const fftBySize = new Map<number, FFT>();
function fftOfSize(size: number): FFT {
  let f = fftBySize.get(size);
  if (!f) {
    if (fftBySize.size >= 8) fftBySize.clear();
    f = new FFT(size);
    fftBySize.set(size, f);
  }
  return f;
}

/** Smallest power of two ≥ 2n: the zero-padding that makes the FFT's circular correlation linear. */
export function paddedFftSize(n: number): number {
  if (!Number.isInteger(n) || n < 1) throw new AnalysisError("INVALID_OPTION", `paddedFftSize(n): must be an integer ≥ 1, got ${n}`);
  let size = 2;
  while (size < 2 * n) size *= 2;
  return size;
}

/**
 * Autocovariance Γ(t) = 1/(n−t) Σ_{i<n−t} (x_i − x̄)(x_{i+t} − x̄) for t = 0..maxLag, via FFT.
 *
 * Input: a finite series of n ≥ 2 points and maxLag in [0, n−1]. Output: Float64Array of length
 * maxLag+1. The deviations are zero-padded to a power of two ≥ 2n, so the circular correlation
 * computed by the FFT equals the linear one at every lag < n (no wrap-around).
 */
export function autocovariance(x: Float64Array, maxLag: number): Float64Array {
  assertSeries(x, "autocovariance(x)", 2);
  const n = x.length;
  if (!Number.isInteger(maxLag) || maxLag < 0 || maxLag > n - 1) {
    throw new AnalysisError("INVALID_OPTION", `autocovariance(maxLag): must be an integer in [0, ${n - 1}], got ${maxLag}`);
  }
  let mean = 0;
  for (let i = 0; i < n; i++) mean += x[i];
  mean /= n;

  const size = paddedFftSize(n);
  const fft = fftOfSize(size);
  const buf = new Float64Array(size);
  for (let i = 0; i < n; i++) buf[i] = x[i] - mean;
  const spec = new Float64Array(2 * size);
  fft.realTransform(spec, buf);

  // The power spectrum of a real signal is real and even (P_k = P_{size−k}), so its inverse DFT
  // equals its forward DFT divided by size: a second *real* transform does the job, cheaper than
  // fft.js's complex inverseTransform. realTransform fills bins 0..size/2, which is all we need.
  const half = size >>> 1;
  for (let k = 0; k <= half; k++) {
    const re = spec[2 * k];
    const im = spec[2 * k + 1];
    const p = re * re + im * im;
    buf[k] = p;
    if (k > 0 && k < half) buf[size - k] = p;
  }
  fft.realTransform(spec, buf);

  const gamma = new Float64Array(maxLag + 1);
  for (let t = 0; t <= maxLag; t++) gamma[t] = spec[2 * t] / size / (n - t);
  return gamma;
}
