/** How the summation window of the autocorrelation function was chosen. */
export type WindowMethod = "gamma-wolff" | "gamma-madras-sokal";

/** Rule that set the thermalisation cut: MSER-5 automatic or a user override. */
export type CutRule = "mser-5" | "user";

/** The thermalisation cut applied before measuring: the first `index` points are discarded. */
export interface ThermalisationCut {
  index: number;
  rule: CutRule;
}

/**
 * Gamma-method result for one series (no cut information): the mean with its error, the
 * integrated autocorrelation time, the window and the normalised ACF for plotting.
 */
export interface GammaResult {
  method: WindowMethod;
  mean: number;
  /** Standard error of the mean, sqrt(2 τ_int Γ(0) / n) with Wolff's bias-corrected Γ. */
  error: number;
  /** Statistical error of `error` itself: error·sqrt((W + 1/2)/n) (Wolff 2004). */
  errorOfError: number;
  tauInt: number;
  /** Madras–Sokal/Wolff approximation 2 τ_int sqrt((W + 1/2 − τ_int)/n). */
  tauIntError: number;
  /** Summation window W: τ_int = 1/2 + Σ_{t=1}^{W} ρ(t). */
  window: number;
  /** False when the windowing rule never fired up to ⌊n/2⌋ and W was set to that limit. */
  windowConverged: boolean;
  /** The rule's parameter: Wolff's S or the Madras–Sokal factor c. */
  windowParameter: number;
  /** Number of points analysed. */
  n: number;
  /** Normalised autocorrelation ρ(t), t = 0..acf.length−1 (plain array so it serialises to JSON). */
  acf: number[];
  /** τ_int(w) = 1/2 + Σ_{t=1}^{w} ρ(t) for the same lags, to plot the window choice. */
  tauIntByWindow: number[];
  warnings: string[];
}

/** A stored estimate of one observable of one run: Gamma result plus the cut and the version. */
export interface Estimate extends GammaResult {
  analysisVersion: string;
  cut: ThermalisationCut;
  /** Length of the series before the cut. */
  nTotal: number;
}
