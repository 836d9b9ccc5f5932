// Client side of the streamed upload answer: split NDJSON text into lines and fold them into what the form shows.
import type { Outcome } from "./upload-outcomes";

/** A line of POST /api/v1/imports with Accept: application/x-ndjson (lib/uploads/progress-stream.ts). */
export type ProgressLine =
  | { type: "received"; bytes: number; bundles: number; refusedEarly: number }
  | { type: "bundle"; index: number; total: number; bundle: string; stage: "checking" | "importing" | "estimates" }
  | { type: "outcome"; index: number; total: number; outcome: Outcome }
  | { type: "result"; data: { bundles: Outcome[] } }
  | { type: "error"; error: { message: string } };

/** What the form shows while bundles are imported. */
export type ImportState = { total: number; done: Outcome[]; current: { index: number; bundle: string; stage: string } | null };

/** How far into one bundle each step is (a step is reported when it starts). */
const STAGE_SHARE = { checking: 0.05, importing: 0.25, estimates: 0.8 } as const;
export const STAGE_WORDS = { checking: "checking files and hashes", importing: "importing series", estimates: "computing estimates" } as const;

/** Share of the whole import done: finished bundles plus the step the current one has reached. */
export function importShare(s: ImportState): number {
  if (s.total === 0) return 0; // bundles not found yet
  const partial = s.current && s.current.index >= s.done.length ? STAGE_SHARE[s.current.stage as keyof typeof STAGE_SHARE] ?? 0 : 0;
  return Math.min(1, (s.done.length + partial) / s.total);
}

/** Reads complete lines from a growing response text; `take` returns the lines that arrived since the last call. */
export function lineReader() {
  let seen = 0;
  return (text: string): ProgressLine[] => {
    const end = text.lastIndexOf("\n") + 1;
    if (end <= seen) return [];
    const chunk = text.slice(seen, end);
    seen = end;
    return chunk.split("\n").filter((l) => l.trim() !== "").map((l) => JSON.parse(l) as ProgressLine);
  };
}

/** The state after one more line. */
export function step(s: ImportState, line: ProgressLine): ImportState {
  if (line.type === "received") return { ...s, total: line.bundles };
  if (line.type === "bundle") return { ...s, total: line.total, current: { index: line.index, bundle: line.bundle, stage: line.stage } };
  if (line.type === "outcome") return { ...s, total: line.total, done: [...s.done, line.outcome] };
  return s;
}
