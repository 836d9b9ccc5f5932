import "server-only";
// Spectrum view of a run that stored its final spectrum (loggas writes spectrum.csv, archived as an
// "extra" RunArtifact): counting function with its Weyl fit, and the heat-kernel spectral dimension.
import fs from "node:fs/promises";
import { AnalysisError, countingFunction, heatKernel, weylFit } from "@/lib/analysis";
import { AppError } from "@/lib/errors";
import { resolveArchived } from "@/lib/storage/archive-path";
import { db } from "@/models";

/** Points of the counting-function curve and of the σ grid sent to the plot. */
const CURVE_POINTS = 400;
const SIGMA_POINTS = 64;

/** Parse spectrum.csv (header "lambda", one finite value a line); errors name the line. */
export function parseSpectrumCsv(text: string, file = "spectrum.csv"): Float64Array {
  const lines = text.split(/\r?\n/);
  if (lines[0]?.trim() !== "lambda") throw new AppError("invalid", `${file}: line 1 must be the header "lambda", got ${JSON.stringify(lines[0] ?? "")}`);
  const out: number[] = [];
  for (let i = 1; i < lines.length; i++) {
    const s = lines[i].trim();
    if (s === "") continue;
    const v = Number(s);
    if (!Number.isFinite(v)) throw new AppError("invalid", `${file}: line ${i + 1} is not a finite number: ${JSON.stringify(s)}`);
    out.push(v);
  }
  if (out.length === 0) throw new AppError("invalid", `${file}: no eigenvalues`);
  return Float64Array.from(out);
}

/**
 * The spectrum analysis of run `runId`. A Gaussian β-ensemble has eigenvalues of both signs,
 * while Weyl's law and the heat kernel need a non-negative operator, so the spectrum is shifted
 * by −λ_min when it has negative values (the shift is returned; the smallest becomes a zero mode).
 */
export async function runSpectrum(runId: string) {
  const link = await db().RunArtifact.findOne({ where: { runId, role: "extra", path: "spectrum.csv" }, include: [{ association: "artifact" }] });
  if (!link?.artifact) throw new AppError("not_found", "this run stored no spectrum (spectrum.csv)");
  const text = await fs.readFile(resolveArchived(link.artifact.storagePath), "utf8");
  const raw = parseSpectrumCsv(text);
  const sorted = Float64Array.from(raw).sort();
  const shift = sorted[0] < 0 ? -sorted[0] : 0;
  const lambda = sorted.map((v) => v + shift);
  const top = lambda[lambda.length - 1];
  const at = Float64Array.from({ length: CURVE_POINTS }, (_, i) => (top * (i + 1)) / CURVE_POINTS);
  try {
    const N = countingFunction(lambda, at);
    let weyl: ReturnType<typeof weylFit> | null = null;
    let weylProblem: string | null = null;
    try { weyl = weylFit(lambda); } catch (err) { if (!(err instanceof AnalysisError)) throw err; weylProblem = err.message; }
    const hk = heatKernel(lambda, { points: SIGMA_POINTS });
    return {
      runId, artifact: { sha256: link.artifact.sha256, path: link.path, bytes: link.artifact.bytes }, eigenvalues: raw.length,
      shift, lambdaMin: sorted[0], lambdaMax: sorted[sorted.length - 1],
      counting: Array.from(at, (x, i) => ({ lambda: x, N: N[i], weyl: weyl ? Math.exp(weyl.logPrefactor) * Math.pow(x, weyl.dimension / 2) : null })),
      weyl, weylProblem,
      heatKernel: Array.from(hk.sigma, (s, i) => ({ sigma: s, K: hk.K[i], logK: hk.logK[i], ds: hk.spectralDimension[i] })),
      zeroModes: hk.zeroModes, analysisVersion: hk.analysisVersion,
    };
  } catch (err) {
    if (err instanceof AnalysisError) throw new AppError("invalid", `spectrum of run ${runId}: ${err.message}`);
    throw err;
  }
}
