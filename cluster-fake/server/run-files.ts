import fs from "node:fs";
import path from "node:path";
import type { Progress } from "./state-store.js";

/** The sampler name from a staged run.json, or an error saying what is wrong with the file. */
export function readSamplerName(file: string): string {
  let json: { sampler?: { name?: unknown } };
  try {
    json = JSON.parse(fs.readFileSync(file, "utf8"));
  } catch (err) {
    const e = err as NodeJS.ErrnoException;
    throw new Error(e.code === "ENOENT" ? `no run.json staged at ${path.basename(path.dirname(file))}/run.json`
      : `run.json is not valid JSON: ${e.message}`);
  }
  const name = json?.sampler?.name;
  if (typeof name !== "string" || !/^[a-z0-9][a-z0-9_-]{0,63}$/.test(name)) {
    throw new Error("run.json: sampler.name must be a lower-case sampler name");
  }
  return name;
}

/** Progress written since `sinceMs`; an older file belongs to a previous attempt. */
export function readProgress(file: string, sinceMs: number): Progress | null {
  try {
    // 1 s slack: some file systems store mtime in whole seconds.
    if (fs.statSync(file).mtimeMs < sinceMs - 1000) return null;
    const p = JSON.parse(fs.readFileSync(file, "utf8")) as Progress;
    if (Number.isFinite(p.sweepsDone) && Number.isFinite(p.sweepsTotal)) {
      return { sweepsDone: p.sweepsDone, sweepsTotal: p.sweepsTotal, updatedAt: String(p.updatedAt) };
    }
  } catch {
    // Missing or mid-rewrite: no new information.
  }
  return null;
}
