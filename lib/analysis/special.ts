import { assertOption } from "./errors";

// Hand-written because no statistics package is installed (and only the χ² tail is needed):
// the regularised incomplete gamma function by its series and continued fraction, the standard
// pair of expansions (Abramowitz & Stegun 6.5.29 and 6.5.31).

// Lanczos (1964) approximation, g = 7 with nine coefficients (the widely tabulated set).
const LANCZOS = [
  0.99999999999980993, 676.5203681218851, -1259.1392167224028, 771.32342877765313, -176.61502916214059,
  12.507343278686905, -0.13857109526572012, 9.9843695780195716e-6, 1.5056327351493116e-7,
];

/** ln Γ(a) for a > 0 (relative accuracy ~1e-15). */
export function lnGamma(a: number): number {
  if (a < 0.5) return Math.log(Math.PI / Math.sin(Math.PI * a)) - lnGamma(1 - a); // reflection
  const z = a - 1;
  let s = LANCZOS[0];
  for (let i = 1; i < 9; i++) s += LANCZOS[i] / (z + i);
  const t = z + 7.5;
  return 0.5 * Math.log(2 * Math.PI) + (z + 0.5) * Math.log(t) - t + Math.log(s);
}

/** Upper regularised incomplete gamma Q(a, x) = Γ(a, x)/Γ(a), for a > 0 and x ≥ 0. */
export function gammaQ(a: number, x: number): number {
  if (x <= 0) return 1;
  const logPrefactor = a * Math.log(x) - x - lnGamma(a);
  if (x < a + 1) {
    // Series for P(a, x), converging fast below the peak of the integrand.
    let term = 1 / a;
    let sum = term;
    for (let n = 1; n < 1000 && Math.abs(term) > Math.abs(sum) * 1e-16; n++) {
      term *= x / (a + n);
      sum += term;
    }
    return Math.max(0, 1 - sum * Math.exp(logPrefactor));
  }
  // Continued fraction for Q(a, x) by the modified Lentz method.
  const tiny = 1e-300;
  let b = x + 1 - a;
  let c = 1 / tiny;
  let d = 1 / b;
  let h = d;
  for (let i = 1; i < 1000; i++) {
    const an = -i * (i - a);
    b += 2;
    d = an * d + b;
    if (Math.abs(d) < tiny) d = tiny;
    c = b + an / c;
    if (Math.abs(c) < tiny) c = tiny;
    d = 1 / d;
    const delta = d * c;
    h *= delta;
    if (Math.abs(delta - 1) < 1e-16) break;
  }
  return Math.exp(logPrefactor) * h;
}

/** P(χ²_dof > chi2): the upper tail of the χ² distribution (chi2 ≥ 0, dof > 0). */
export function chi2Survival(chi2: number, dof: number): number {
  assertOption(chi2, "chi2Survival(chi2)", "a finite number ≥ 0", (v) => v >= 0);
  assertOption(dof, "chi2Survival(dof)", "a finite number > 0", (v) => v > 0);
  return gammaQ(dof / 2, chi2 / 2);
}
