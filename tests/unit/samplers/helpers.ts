/**
 * Test helpers for the sampler checks: a binning error estimate for correlated series,
 * in-process runs of a sampler core, and CLI spawning.
 *
 * Error bars: the series is cut into blocks of B ≥ 20·tau_guess consecutive values
 * (common practice: blocks much longer than the autocorrelation time are nearly
 * independent), and the error of the mean is the standard error of the block means.
 * The binning ratio also gives tau ≈ B·var(block means)/(2·var(x)); each estimate
 * asserts B ≥ 10·tau measured, so a too-small guess fails loudly instead of
 * shrinking the error bar.
 */
import { spawn } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { createRng } from "@/lib/samplers/rng";
import { gammaMethod } from "@/lib/analysis";
import { validateParams } from "@/lib/samplers/validate";
import { CORE_FACTORIES } from "@/cluster-fake/samplers/registry";
import type { SamplerName } from "@/lib/samplers/schemas";

/** Mean of an array. */
export function mean(x: ArrayLike<number>): number {
  let s = 0;
  for (let i = 0; i < x.length; i++) s += x[i];
  return s / x.length;
}

/** Unbiased sample variance. */
export function variance(x: ArrayLike<number>): number {
  const m = mean(x);
  let s = 0;
  for (let i = 0; i < x.length; i++) s += (x[i] - m) ** 2;
  return s / (x.length - 1);
}

/** Mean with binning error; tau is the binning estimate of the integrated autocorrelation time. */
export interface Estimate {
  mean: number;
  err: number;
  tau: number;
  blockSize: number;
  blocks: number;
}

/**
 * The run's own error bar, as the issue asks: the Gamma method of Wolff (2004) from lib/analysis
 * (automatic window, S = 1.5). The binning estimate below is kept as an independent cross-check:
 * the two errors must agree within a factor 1.5 (common practice for error-of-error at these lengths),
 * so a broken analysis library cannot silently widen the tolerance.
 */
export function binned(x: ArrayLike<number>, tauGuess: number): Estimate {
  const g = gammaMethod(Float64Array.from(x));
  const b = binning(x, tauGuess);
  const ratio = g.error / b.err;
  if (g.error > 0 && (ratio > 1.5 || ratio < 1 / 1.5)) {
    throw new Error(`Gamma-method error ${g.error.toExponential(2)} and binning error ${b.err.toExponential(2)} disagree (ratio ${ratio.toFixed(2)})`);
  }
  return { mean: g.mean, err: g.error, tau: g.tauInt, blockSize: b.blockSize, blocks: b.blocks };
}

/** Binning estimate with blocks of ceil(20·tauGuess) values (see the file comment). */
export function binning(x: ArrayLike<number>, tauGuess: number): Estimate {
  const B = Math.max(1, Math.ceil(20 * tauGuess));
  const nb = Math.floor(x.length / B);
  if (nb < 20) throw new Error(`only ${nb} blocks of ${B}: run longer (need ≥ 20 blocks)`);
  const means = new Float64Array(nb);
  for (let b = 0; b < nb; b++) {
    let s = 0;
    for (let i = b * B; i < (b + 1) * B; i++) s += x[i];
    means[b] = s / B;
  }
  const v = variance(x);
  const vb = variance(means);
  const tau = v === 0 ? 0.5 : (B * vb) / (2 * v);
  if (B < 10 * tau) throw new Error(`block size ${B} < 10·tau (${tau.toFixed(1)}): raise the tau guess`);
  return { mean: mean(means), err: Math.sqrt(vb / nb), tau, blockSize: B, blocks: nb };
}

/** Tolerance factor for "measured agrees with exact": 4 standard errors. */
export const SIGMA = 4;

/** |measured − exact| in units of the error, for messages. */
export function pull(est: Estimate, exact: number): number {
  return (est.mean - exact) / est.err;
}

/** Run a sampler core in-process and return its observables' series. */
export function runCore(
  name: SamplerName,
  params: Record<string, unknown>,
  opts: { seed: string; thermalization: number; measurements: number; interval?: number },
): Record<string, Float64Array> {
  const checked = validateParams(name, params);
  if (!checked.ok) throw new Error(checked.error);
  const core = CORE_FACTORIES[name](checked.value, createRng(opts.seed));
  core.init();
  for (let i = 0; i < opts.thermalization; i++) core.sweep();
  core.startMeasuring?.();
  const cols = core.observables.map(() => new Float64Array(opts.measurements));
  const out = new Float64Array(core.observables.length);
  const interval = opts.interval ?? 1;
  for (let k = 0; k < opts.measurements; k++) {
    for (let i = 0; i < interval; i++) core.sweep();
    core.measure(out);
    for (let c = 0; c < cols.length; c++) cols[c][k] = out[c];
  }
  return Object.fromEntries(core.observables.map((n, c) => [n, cols[c]]));
}

export const repoRoot = path.resolve(import.meta.dirname, "../../..");

/** A fresh temporary directory. */
export function tmpDir(prefix: string): string {
  return fs.mkdtempSync(path.join(os.tmpdir(), `ergodex-${prefix}-`));
}

/** A run.json object with defaults for the fields a test does not care about. */
export function runJson(sampler: SamplerName, params: Record<string, unknown>, extra: Record<string, unknown> = {}) {
  return {
    format: "ergodex.run/1",
    runId: "00000000-0000-4000-8000-000000000001",
    sampler: { name: sampler, version: "1.0.0" },
    params,
    seed: "12345678901234567890",
    thermalization: 100,
    measurements: 200,
    interval: 1,
    ...extra,
  };
}

/** Write a run.json into dir and return its path. */
export function writeRunJson(dir: string, run: unknown): string {
  const file = path.join(dir, "run.json");
  fs.writeFileSync(file, typeof run === "string" ? run : JSON.stringify(run));
  return file;
}

/** A spawned CLI process with a promise of its exit code and stderr. */
export interface CliRun {
  pid: number;
  kill(sig: NodeJS.Signals): void;
  done: Promise<{ code: number | null; stderr: string }>;
}

/** Spawn `tsx cluster-fake/samplers/cli.ts ...args` from the repo root. */
export function spawnCli(args: string[]): CliRun {
  const child = spawn(path.join(repoRoot, "node_modules/.bin/tsx"), ["cluster-fake/samplers/cli.ts", ...args], {
    cwd: repoRoot,
    stdio: ["ignore", "ignore", "pipe"],
  });
  let stderr = "";
  child.stderr!.on("data", (d: Buffer) => (stderr += d.toString()));
  const done = new Promise<{ code: number | null; stderr: string }>((resolve, reject) => {
    child.on("error", reject);
    child.on("close", (code) => resolve({ code, stderr }));
  });
  return { pid: child.pid!, kill: (sig) => child.kill(sig), done };
}
