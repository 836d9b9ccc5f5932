/**
 * Runs one chain to a result bundle: thermalization, measurements every `interval`
 * sweeps, progress.json about once a second, and on a stop request (SIGTERM) a
 * checkpoint from which a rerun on the same outdir continues bit for bit.
 */
import fs from "node:fs";
import path from "node:path";
import { createRng, rngFromState } from "../../lib/samplers/rng";
import { SAMPLER_VERSIONS, type SamplerName } from "../../lib/samplers/schemas";
import type { RunInput } from "../../lib/samplers/validate";
import { hashPrefix, writeJsonAtomic, writeManifest } from "./bundle";
import { readCheckpoint, removeCheckpoint, writeCheckpoint, type RunIdentity } from "./checkpoint";
import { CORE_FACTORIES } from "./registry";
import { SeriesWriter, seriesFileName, type Encoding } from "./series-writer";

/** Set `requested` (e.g. from a signal handler) to make the driver checkpoint and return. */
export interface StopFlag {
  requested: boolean;
}

/** Inputs of driveRun: a validated run.json and its params with defaults filled in. */
export interface DriveOptions {
  run: RunInput;
  sampler: SamplerName;
  params: Record<string, unknown>;
  outdir: string;
  stop: StopFlag;
  /** Minimum time between progress.json rewrites (default 1000 ms). */
  progressEveryMs?: number;
}

/** How a drive ended. */
export type DriveResult =
  | { status: "done"; rows: number; resumedFrom: number | null }
  | { status: "interrupted"; sweepsDone: number };

// Clock checks every ~this many elementary updates: rare enough to cost nothing, frequent
// enough (well under a millisecond) that a SIGTERM is seen promptly.
const CLOCK_STRIDE_WORK = 50_000;
const YIELD_EVERY_MS = 50;

const yieldToEventLoop = () => new Promise<void>((resolve) => setImmediate(resolve));

/** Run (or resume) one chain in outdir; see the file comment. */
export async function driveRun(o: DriveOptions): Promise<DriveResult> {
  const { run, outdir, stop } = o;
  const encoding: Encoding = run.encoding ?? "csv";
  const identity: RunIdentity = {
    runId: run.runId,
    sampler: { name: o.sampler, version: SAMPLER_VERSIONS[o.sampler] },
    params: o.params,
    seed: run.seed,
    thermalization: run.thermalization,
    measurements: run.measurements,
    interval: run.interval,
    encoding,
  };
  const total = run.thermalization + run.measurements * run.interval;
  const seriesFile = seriesFileName(encoding);
  const seriesPath = path.join(outdir, seriesFile);
  const progressPath = path.join(outdir, "progress.json");
  const cp = readCheckpoint(outdir, identity);

  const rng = cp ? rngFromState(cp.rng) : createRng(run.seed);
  const core = CORE_FACTORIES[o.sampler](o.params, rng);
  const columns = ["sweep", ...core.observables];
  let writer: SeriesWriter;
  let done: number;
  let startedAt: string;
  if (cp) {
    core.loadState(cp.core);
    writer = new SeriesWriter(seriesPath, encoding, columns, { bytes: cp.series.bytes, rows: cp.series.rows });
    done = cp.sweepsDone;
    startedAt = cp.startedAt;
  } else {
    fs.rmSync(path.join(outdir, "manifest.json"), { force: true }); // never leave a stale manifest beside a new series
    core.init();
    writer = new SeriesWriter(seriesPath, encoding, columns);
    done = 0;
    startedAt = new Date().toISOString();
  }

  const writeProgress = () =>
    writeJsonAtomic(progressPath, { sweepsDone: done, sweepsTotal: total, updatedAt: new Date().toISOString() });
  writeProgress();

  const every = o.progressEveryMs ?? 1000;
  const stride = Math.max(1, Math.ceil(CLOCK_STRIDE_WORK / core.workPerSweep));
  const therm = run.thermalization;
  const interval = run.interval;
  const out = new Float64Array(core.observables.length);
  let nextCheck = done + stride;
  let lastProgress = Date.now();
  let lastYield = lastProgress;
  if (done >= therm) core.startMeasuring?.();

  while (done < total) {
    if (stop.requested) break;
    core.sweep();
    done++;
    if (done === therm) core.startMeasuring?.();
    if (done > therm && (done - therm) % interval === 0) {
      core.measure(out);
      writer.append(done, out);
    }
    if (done >= nextCheck) {
      nextCheck = done + stride;
      const now = Date.now();
      if (now - lastProgress >= every) {
        writeProgress();
        lastProgress = now;
      }
      if (now - lastYield >= YIELD_EVERY_MS) {
        await yieldToEventLoop(); // lets a pending SIGTERM handler run
        lastYield = Date.now();
      }
    }
  }

  if (done < total) {
    const bytes = writer.close();
    writeCheckpoint(outdir, {
      format: "ergodex.checkpoint/1",
      identity,
      startedAt,
      sweepsDone: done,
      series: { file: seriesFile, bytes, rows: writer.rows, sha256: hashPrefix(seriesPath, bytes) },
      rng: [...rng.getState()],
      core: core.saveState(),
    });
    writeProgress();
    return { status: "interrupted", sweepsDone: done };
  }

  writer.close();
  const extra = core.extraFiles();
  for (const f of extra) fs.writeFileSync(path.join(outdir, f.path), f.data);
  writeProgress();
  writeManifest(outdir, {
    runId: run.runId,
    sampler: o.sampler,
    params: o.params,
    seed: run.seed,
    startedAt,
    finishedAt: new Date().toISOString(),
    series: { file: seriesFile, encoding, rows: writer.rows },
    files: [seriesFile, ...extra.map((f) => f.path), "progress.json"],
  });
  removeCheckpoint(outdir);
  return { status: "done", rows: writer.rows, resumedFrom: cp ? cp.sweepsDone : null };
}
