// loggas (Gaussian β-ensemble) against exact moments and the semicircle edge.
// Tolerance: SIGMA (4) binning standard errors (helpers.ts) unless stated otherwise.
import { describe, expect, it } from "vitest";
import { SIGMA, binned, pull, runCore, type Estimate } from "./helpers";

/**
 * Exact E[Σλ²] for density ∝ Π_{i<j}|λi−λj|^β exp(−Σλ²/2), derived two ways:
 * (1) Integration by parts: E[Σ_i λ_i ∂_i log p] = −N, and Σ_i λ_i ∂_i log p =
 *     β Σ_{i<j} (λi−λj)/(λi−λj) − Σλ² = βN(N−1)/2 − Σλ², so E[Σλ²] = N + βN(N−1)/2.
 * (2) Dumitriu & Edelman (2002): H = (1/√2)·tridiag(N(0,2) on the diagonal, χ_{(N−1)β}…χ_β
 *     off it) has these eigenvalues, and E[tr H²] = ½(N·2 + 2·Σ_{k=1}^{N−1} kβ) = N + βN(N−1)/2.
 * They agree, which also confirms the 1/√2 normalisation of the tridiagonal model.
 * The series column is sumSq = Σλ²/N, so E[sumSq] = 1 + β(N−1)/2.
 */
const exactSumSq = (N: number, beta: number) => 1 + (beta * (N - 1)) / 2;

function check(est: Estimate, exact: number, what: string) {
  const msg = `${what}: measured ${est.mean.toFixed(5)} ± ${est.err.toExponential(2)} (tau ${est.tau.toFixed(1)}), exact ${exact.toFixed(5)}, pull ${pull(est, exact).toFixed(2)}`;
  console.log(msg);
  expect(Math.abs(est.mean - exact), msg).toBeLessThan(SIGMA * est.err);
}

describe("loggas tridiagonal (Dumitriu–Edelman 2002) vs exact E[Σλ²]", () => {
  it.each([
    [1, 1],
    [5, 0.5],
    [5, 1],
    [10, 2],
    [20, 4],
  ])("N=%i β=%f", (N, beta) => {
    const s = runCore("loggas", { N, beta, method: "tridiagonal" }, { seed: `${N * 10 + beta * 2}`, thermalization: 0, measurements: 10_000 });
    check(binned(s.sumSq, 1), exactSumSq(N, beta), "sumSq"); // independent samples: tau = 1/2
  });
});

describe("loggas Metropolis vs exact E[Σλ²] and vs the tridiagonal model", () => {
  it.each([
    [5, 1],
    [12, 2],
    [8, 4],
    [8, 0.5],
  ])("N=%i β=%f", (N, beta) => {
    const met = runCore("loggas", { N, beta, method: "metropolis" }, { seed: `${N * 100 + beta * 2}`, thermalization: 2000, measurements: 60_000 });
    const tri = runCore("loggas", { N, beta, method: "tridiagonal" }, { seed: `${N * 100 + beta * 2 + 1}`, thermalization: 0, measurements: 20_000 });
    const m = binned(met.sumSq, 30);
    check(m, exactSumSq(N, beta), "metropolis sumSq");
    // λ_max has no closed form at finite N: the two methods must agree within 4 combined sigma.
    const lm = binned(met.lambdaMax, 30);
    const lt = binned(tri.lambdaMax, 1);
    const both = Math.hypot(lm.err, lt.err);
    console.log(`lambdaMax N=${N} β=${beta}: metropolis ${lm.mean.toFixed(4)} ± ${lm.err.toExponential(2)}, tridiagonal ${lt.mean.toFixed(4)} ± ${lt.err.toExponential(2)}`);
    expect(Math.abs(lm.mean - lt.mean)).toBeLessThan(SIGMA * both);
    const st = binned(tri.sumSq, 1);
    expect(Math.abs(m.mean - st.mean)).toBeLessThan(SIGMA * Math.hypot(m.err, st.err));
  });
});

describe("loggas semicircle edge: λ_max ≈ sqrt(2βN) for large N", () => {
  // Under this weight the semicircle has radius R = sqrt(2βN) (β=2: 2√N for E|H_ij|² = 1).
  // At finite N, λ_max − R ≈ sqrt(β/2)·N^{−1/6}·TW_β with Tracy–Widom means of order −1 to −2.3
  // (recalled from memory); we allow 3·sqrt(β/2)·N^{−1/6} plus 4 sigma (common practice),
  // about 6 % of R at N = 200, and require the mean to lie below R as the TW means do.
  it.each([1, 2, 4])("N=200 β=%f", (beta) => {
    const N = 200;
    const s = runCore("loggas", { N, beta, method: "tridiagonal" }, { seed: `${2000 + beta}`, thermalization: 0, measurements: 300 });
    const est = binned(s.lambdaMax, 0.5);
    const R = Math.sqrt(2 * beta * N);
    const scale = Math.sqrt(beta / 2) * N ** (-1 / 6);
    console.log(`λmax N=${N} β=${beta}: ${est.mean.toFixed(3)} ± ${est.err.toExponential(2)}, R=${R.toFixed(3)}, (λmax−R)/(sqrt(β/2)N^-1/6) = ${((est.mean - R) / scale).toFixed(2)}`);
    expect(Math.abs(est.mean - R)).toBeLessThan(3 * scale + SIGMA * est.err);
    expect(est.mean).toBeLessThan(R);
    check(binned(s.sumSq, 0.5), exactSumSq(N, beta), "sumSq N=200");
  });
});
