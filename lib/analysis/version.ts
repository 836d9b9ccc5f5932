/**
 * Version of the analysis rules. Every estimate records it, so a stored number can be traced
 * to the exact windowing, cut and jackknife rules that produced it. Bump the minor version when
 * a default changes (S, c, bin-size rule, MSER batch size), the major one when a result type changes.
 */
export const ANALYSIS_VERSION = "1.0.0";
