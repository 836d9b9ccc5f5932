/**
 * checkpoint.json: everything needed to continue a run bit for bit — the run's identity,
 * sweeps done, the generator state, the sampler's configuration, and the length and hash
 * of the partial series file (which stays in outdir and is appended to on resume).
 */
import fs from "node:fs";
import path from "node:path";
import { BadInputError } from "./errors";
import { hashPrefix, writeJsonAtomic } from "./bundle";
import type { RunInput } from "../../lib/samplers/validate";

export const CHECKPOINT_FILE = "checkpoint.json";

/** The identity a checkpoint must share with the run.json that resumes it (run.json less its format tag). */
export type RunIdentity = Omit<RunInput, "format" | "encoding"> & { encoding: string };

/** Contents of checkpoint.json. */
export interface Checkpoint {
  format: "ergodex.checkpoint/1";
  identity: RunIdentity;
  startedAt: string;
  sweepsDone: number;
  series: { file: string; bytes: number; rows: number; sha256: string };
  rng: number[];
  core: Record<string, unknown>;
}

/** Write a checkpoint atomically. */
export function writeCheckpoint(outdir: string, cp: Checkpoint): void {
  writeJsonAtomic(path.join(outdir, CHECKPOINT_FILE), cp);
}

/** Remove the checkpoint once the bundle is complete. */
export function removeCheckpoint(outdir: string): void {
  fs.rmSync(path.join(outdir, CHECKPOINT_FILE), { force: true });
}

// Key order does not matter for "same params": compare canonical JSON.
function canonical(v: unknown): string {
  if (Array.isArray(v)) return `[${v.map(canonical).join(",")}]`;
  if (v && typeof v === "object") {
    const o = v as Record<string, unknown>;
    return `{${Object.keys(o).sort().map((k) => `${JSON.stringify(k)}:${canonical(o[k])}`).join(",")}}`;
  }
  return JSON.stringify(v);
}

/**
 * The checkpoint in outdir, or undefined if there is none. Throws BadInputError if it
 * belongs to another run or its partial series no longer matches.
 */
export function readCheckpoint(outdir: string, identity: RunIdentity): Checkpoint | undefined {
  const file = path.join(outdir, CHECKPOINT_FILE);
  if (!fs.existsSync(file)) return undefined;
  let cp: Checkpoint;
  try {
    cp = JSON.parse(fs.readFileSync(file, "utf8")) as Checkpoint;
  } catch (err) {
    throw new BadInputError(`${file} is not valid JSON (${(err as Error).message}); remove it to start afresh`);
  }
  if (cp?.format !== "ergodex.checkpoint/1") throw new BadInputError(`${file} is not an ergodex checkpoint`);
  if (canonical(cp.identity) !== canonical(identity)) {
    throw new BadInputError(`${file} belongs to a different run or settings; remove it or use another outdir`);
  }
  const seriesPath = path.join(outdir, cp.series.file);
  let sha: string;
  try {
    sha = hashPrefix(seriesPath, cp.series.bytes);
  } catch (err) {
    throw new BadInputError(`partial series ${seriesPath} unusable for resume: ${(err as Error).message}`);
  }
  if (sha !== cp.series.sha256) throw new BadInputError(`partial series ${seriesPath} changed since the checkpoint`);
  return cp;
}
