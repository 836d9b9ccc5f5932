/**
 * loggas: Gaussian β-ensemble of N eigenvalues, joint density ∝ Π_{i<j}|λi−λj|^β exp(−Σλ²/2).
 *
 * metropolis: one sweep = N single-eigenvalue moves λ_i' = λ_i + step·(2u−1) (i in order),
 *   accepted with the ratio of the joint density. Deterministic start: N points evenly
 *   spread over the middle half of the semicircle [−R, R], R = sqrt(2βN).
 * tridiagonal: one sweep = a fresh independent sample of the Dumitriu–Edelman (2002)
 *   tridiagonal model H = (1/√2)·tridiag(diag N(0,2), off χ_{(N−1)β}, …, χ_β), whose
 *   eigenvalues have exactly the density above; eigenvalues by implicit QR.
 * The final spectrum (ascending) goes to spectrum.csv.
 */
import type { LoggasParams } from "../../lib/samplers/schemas";
import { uniform01 } from "../../lib/samplers/rng";
import { decodeTyped, encodeTyped, type CoreFactory, type SamplerCore } from "./core";
import { chi, normal } from "./variates";
import { tridiagEigenvalues } from "./tridiag-eigen";

const TWO32 = 4294967296;

/** β·Σ_{j≠i} log(|y − λ_j| / |λ_i − λ_j|); −Infinity if y hits another eigenvalue. */
function logRepulsionChange(lam: Float64Array, i: number, y: number, beta: number): number {
  const li = lam[i];
  let sum = 0;
  let prod = 1;
  // Products of 16 ratios cannot overflow a double; one log per block instead of per pair.
  for (let j = 0, k = 0; j < lam.length; j++) {
    if (j === i) continue;
    prod *= Math.abs(y - lam[j]) / Math.abs(li - lam[j]);
    if (++k === 16) {
      sum += Math.log(prod);
      prod = 1;
      k = 0;
    }
  }
  return beta * (sum + Math.log(prod));
}

function spectrumCsv(eigs: ArrayLike<number>): string {
  let s = "lambda\n";
  for (let i = 0; i < eigs.length; i++) s += `${eigs[i]}\n`;
  return s;
}

function metropolisCore(p: Required<LoggasParams>, rng: Parameters<CoreFactory>[1]): SamplerCore {
  const { N, beta, step } = p;
  const lam = new Float64Array(N);
  return {
    observables: ["sumSq", "lambdaMax"],
    workPerSweep: N * N,
    init() {
      const R = Math.sqrt(2 * beta * N);
      for (let i = 0; i < N; i++) lam[i] = 0.5 * R * ((2 * (i + 0.5)) / N - 1);
    },
    sweep() {
      for (let i = 0; i < N; i++) {
        const li = lam[i];
        const y = li + step * (2 * uniform01(rng) - 1);
        const logR = logRepulsionChange(lam, i, y, beta) - (y * y - li * li) / 2;
        if (logR >= 0 || rng.next() >>> 0 < Math.exp(logR) * TWO32) lam[i] = y;
      }
    },
    measure(out) {
      let s = 0;
      let mx = -Infinity;
      for (let i = 0; i < N; i++) {
        s += lam[i] * lam[i];
        if (lam[i] > mx) mx = lam[i];
      }
      out[0] = s / N;
      out[1] = mx;
    },
    saveState: () => ({ lambda: encodeTyped(lam) }),
    loadState(state) {
      decodeTyped(state.lambda, lam, "loggas eigenvalues");
    },
    extraFiles: () => [{ path: "spectrum.csv", data: spectrumCsv(Float64Array.from(lam).sort()) }],
  };
}

function tridiagonalCore(p: Required<LoggasParams>, rng: Parameters<CoreFactory>[1]): SamplerCore {
  const { N, beta } = p;
  const diag = new Float64Array(N);
  const off = new Float64Array(Math.max(0, N - 1));
  const draw = () => {
    for (let i = 0; i < N; i++) diag[i] = normal(rng); // N(0,2)/√2 = N(0,1)
    for (let i = 0; i < N - 1; i++) off[i] = chi(rng, (N - 1 - i) * beta) / Math.SQRT2;
  };
  return {
    observables: ["sumSq", "lambdaMax"],
    workPerSweep: N * 8,
    init: draw,
    sweep: draw,
    measure(out) {
      const eig = tridiagEigenvalues(diag, off);
      let s = 0;
      for (let i = 0; i < N; i++) s += eig[i] * eig[i];
      out[0] = s / N;
      out[1] = eig[N - 1];
    },
    saveState: () => ({ diag: encodeTyped(diag), off: encodeTyped(off) }),
    loadState(state) {
      decodeTyped(state.diag, diag, "loggas diagonal");
      decodeTyped(state.off, off, "loggas off-diagonal");
    },
    extraFiles: () => [{ path: "spectrum.csv", data: spectrumCsv(tridiagEigenvalues(diag, off)) }],
  };
}

/** Build a loggas core (see the file comment). */
export const createLoggas: CoreFactory = (raw, rng) => {
  const p = raw as unknown as Required<LoggasParams>;
  return p.method === "tridiagonal" ? tridiagonalCore(p, rng) : metropolisCore(p, rng);
};
