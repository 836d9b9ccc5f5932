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
 * maxLag+1. The deviations are zero-padded to a power of two N ≥ 2n, so the circular correlation
 * (inverse DFT of the power spectrum |X_k|²) equals the linear one at every lag < n.
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
  const sums = circularSums(x, mean, maxLag);
  const gamma = new Float64Array(maxLag + 1);
  for (let t = 0; t <= maxLag; t++) gamma[t] = sums[t] / (n - t);
  return gamma;
}

/**
 * c(t) = Σ_i y_i y_{i+t} for the deviations y zero-padded to N = paddedFftSize(n), t ≤ maxLag,
 * as the inverse DFT of the power spectrum P_k = |Y_k|².
 *
 * Hand-written on top of fft.js, why: fft.js's own realTransform at N = 2^21 measured as slow as
 * two complex transforms of 2^20, so both real N-point DFTs (of y, then of P) use the textbook
 * packing of a real sequence a into a complex one of length M = N/2, w_j = a_{2j} + i a_{2j+1}
 * (which is just the Float64Array read as interleaved re/im), one fft.js transform of size M and
 * an O(N) untangling: with W = DFT_M(w),
 *   A_k = E_k + ω^k O_k,  E_k = (W_k + conj W_{M−k})/2,  O_k = (W_k − conj W_{M−k})/(2i),  ω = e^{−2πi/N}.
 * P is real and even, so its forward DFT equals N times its inverse: no inverse transform needed.
 */
function circularSums(x: Float64Array, mean: number, maxLag: number): Float64Array {
  const n = x.length;
  const N = paddedFftSize(n);
  const M = N >>> 1;
  const fft = fftOfSize(M);
  const tw = twiddles(N, M + 1);

  const buf = new Float64Array(N);
  for (let i = 0; i < n; i++) buf[i] = x[i] - mean;
  const W = new Float64Array(N);
  fft.transform(W, buf);
  // Untangle Y_k for k = 0..M and overwrite buf with P_k = |Y_k|² (and P_{N−k} = P_k).
  for (let k = 0; k <= M; k++) {
    untangle(W, k, M, tw.cos[k], tw.sin[k]);
    const p = pair[0] * pair[0] + pair[1] * pair[1];
    buf[k] = p;
    if (k > 0 && k < M) buf[N - k] = p;
  }
  fft.transform(W, buf);
  const out = new Float64Array(maxLag + 1);
  for (let t = 0; t <= maxLag; t++) {
    untangle(W, t, M, tw.cos[t], tw.sin[t]);
    out[t] = pair[0] / N;
  }
  return out;
}

// Output slot of untangle: avoids allocating a pair per bin (millions per call).
const pair = new Float64Array(2);

/** A_k of the real N-point DFT from the packed M-point DFT W (see circularSums), k in [0, M], into `pair`. */
function untangle(W: Float64Array, k: number, M: number, c: number, s: number): void {
  const a = k % M;
  const b = (M - a) % M;
  const wr = W[2 * a];
  const wi = W[2 * a + 1];
  const vr = W[2 * b]; // W_{M−k}; its conjugate enters
  const vi = -W[2 * b + 1];
  const er = 0.5 * (wr + vr);
  const ei = 0.5 * (wi + vi);
  // O = (W − conj W_{M−k}) / (2i): (dr + i di)/(2i) = di/2 − i dr/2
  const or = 0.5 * (wi - vi);
  const oi = -0.5 * (wr - vr);
  // ω^k = c − i s
  pair[0] = er + c * or + s * oi;
  pair[1] = ei + c * oi - s * or;
}

/**
 * cos and sin of 2πj/N for j < count. Math.cos/sin on a million angles would cost as much as a
 * transform, so angles are built as (block start, exact) × (offset in block, exact table): one
 * complex multiplication each, accurate to a few ulp.
 */
function twiddles(N: number, count: number): { cos: Float64Array; sin: Float64Array } {
  const B = 256;
  const bc = new Float64Array(B);
  const bs = new Float64Array(B);
  for (let r = 0; r < B; r++) {
    bc[r] = Math.cos((2 * Math.PI * r) / N);
    bs[r] = Math.sin((2 * Math.PI * r) / N);
  }
  const cos = new Float64Array(count);
  const sin = new Float64Array(count);
  for (let start = 0; start < count; start += B) {
    const c0 = Math.cos((2 * Math.PI * start) / N);
    const s0 = Math.sin((2 * Math.PI * start) / N);
    const end = Math.min(count, start + B);
    for (let j = start; j < end; j++) {
      const r = j - start;
      cos[j] = c0 * bc[r] - s0 * bs[r];
      sin[j] = s0 * bc[r] + c0 * bs[r];
    }
  }
  return { cos, sin };
}
