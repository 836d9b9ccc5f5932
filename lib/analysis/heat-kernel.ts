import { AnalysisError, assertOption, assertSeries } from "./errors";
import { prepareSpectrum, type SpectrumOptions } from "./spectrum";
import { ANALYSIS_VERSION } from "./version";

/** Options of {@link heatKernel}: explicit σ values, or a log grid (defaults in the JSDoc). */
export interface HeatKernelOptions extends SpectrumOptions {
  /** Explicit σ values (each finite and > 0); overrides the grid options. */
  sigma?: Float64Array;
  sigmaMin?: number;
  sigmaMax?: number;
  /** Grid points, default 64. */
  points?: number;
}

/** Heat-kernel trace and spectral dimension on a σ grid. */
export interface HeatKernelResult {
  analysisVersion: string;
  sigma: Float64Array;
  /** K(σ) = Σ e^{−σλ}; may underflow to 0 for a gapped spectrum at huge σ, logK does not. */
  K: Float64Array;
  logK: Float64Array;
  /** d_s(σ) = −2 d ln K/d ln σ = 2σ Σλe^{−σλ} / Σe^{−σλ}. */
  spectralDimension: Float64Array;
  zeroModes: number;
}

/** n points geometrically spaced from min to max inclusive (min, max > 0, n ≥ 2). */
export function logGrid(min: number, max: number, n: number): Float64Array {
  assertOption(min, "logGrid(min)", "a finite number > 0", (v) => v > 0);
  assertOption(max, "logGrid(max)", `a finite number > min = ${min}`, (v) => v > min);
  assertOption(n, "logGrid(n)", "an integer ≥ 2", (v) => Number.isInteger(v) && v >= 2);
  const step = Math.log(max / min) / (n - 1);
  return Float64Array.from({ length: n }, (_, i) => min * Math.exp(i * step));
}

/**
 * Heat-kernel trace K(σ) = Σ_i e^{−σλ_i} and spectral dimension d_s(σ) = 2σ⟨λ⟩_σ, the analytic
 * derivative −2 d ln K/d ln σ (no finite differences). Default grid: 64 points from 0.1/λ_max to
 * 100/λ_min⁺ (smallest positive eigenvalue), covering the rise, any plateau and the finite-size fall.
 *
 * Zero modes are kept: they are part of the spectrum (e.g. the constant mode of a periodic
 * Laplacian), so K → number of zero modes and d_s → 0 at large σ — the expected finite-volume
 * fall. A spectrum without zero modes instead has d_s → 2σλ_min, growing. Sums are shifted by
 * λ_min so nothing underflows to 0/0.
 */
export function heatKernel(eigenvalues: Float64Array, options: HeatKernelOptions = {}): HeatKernelResult {
  const spec = prepareSpectrum(eigenvalues, "heatKernel(eigenvalues)", options);
  const sigma = options.sigma !== undefined ? checkSigma(options.sigma) : defaultGrid(spec.values, options);
  const { values, multiplicity } = spec;
  const lMin = values[0];
  const K = new Float64Array(sigma.length);
  const logK = new Float64Array(sigma.length);
  const ds = new Float64Array(sigma.length);
  for (let s = 0; s < sigma.length; s++) {
    const sg = sigma[s];
    let z = 0;
    let zl = 0;
    for (let j = 0; j < values.length; j++) {
      const shifted = values[j] - lMin;
      const w = multiplicity[j] * Math.exp(-sg * shifted);
      z += w;
      zl += w * shifted;
    }
    logK[s] = Math.log(z) - sg * lMin;
    K[s] = Math.exp(logK[s]);
    ds[s] = 2 * sg * (lMin + zl / z);
  }
  return { analysisVersion: ANALYSIS_VERSION, sigma, K, logK, spectralDimension: ds, zeroModes: spec.zeroModes };
}

function checkSigma(sigma: Float64Array): Float64Array {
  assertSeries(sigma, "heatKernel(sigma)");
  for (let i = 0; i < sigma.length; i++) {
    if (!(sigma[i] > 0)) throw new AnalysisError("INVALID_SIGMA", `heatKernel(sigma): entry ${i} is ${sigma[i]}; σ must be > 0`);
  }
  return sigma;
}

function defaultGrid(values: Float64Array, options: HeatKernelOptions): Float64Array {
  const lMax = values[values.length - 1];
  const firstPositive = values.find((v) => v > 0);
  if (firstPositive === undefined) {
    throw new AnalysisError("DEGENERATE", "heatKernel(eigenvalues): every eigenvalue is zero; K is constant and d_s ≡ 0");
  }
  const min = options.sigmaMin ?? 0.1 / lMax;
  const max = options.sigmaMax ?? 100 / firstPositive;
  for (const [name, v] of [["sigmaMin", min], ["sigmaMax", max]] as const) {
    if (typeof v !== "number" || !Number.isFinite(v) || v <= 0) {
      throw new AnalysisError("INVALID_SIGMA", `heatKernel(${name}): σ must be a finite number > 0, got ${String(v)}`);
    }
  }
  if (max <= min) throw new AnalysisError("INVALID_SIGMA", `heatKernel: sigmaMax = ${max} must exceed sigmaMin = ${min}`);
  const points = options.points ?? 64;
  assertOption(points, "heatKernel(points)", "an integer ≥ 2", (v) => Number.isInteger(v) && v >= 2);
  return logGrid(min, max, points);
}
