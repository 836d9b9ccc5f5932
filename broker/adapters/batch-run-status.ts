import { mapSchedulerState } from "./batch-status";
import type { RunFolderInfo } from "./batch-inspect";
import type { RunTaskView } from "./batch-listing";
import type { RunStatus } from "./types";

/** A submission this adapter made that the last job listing may not show yet. */
export interface OwnSubmission {
  token: string;
  jobId: string;
  at: string;
}

/** What is known about one run, from the listing, from memory and from its folder. */
export interface RunEvidence {
  /** The latest task carrying the run in the job listing. */
  view?: RunTaskView;
  /** Submitted by this adapter after that listing was taken. */
  mine?: OwnSubmission;
  /** Job id this adapter cancelled for the run (scancel accepted it). */
  cancelledJobId?: string;
  folder?: RunFolderInfo;
}

const ACTIVE = new Set(["queued", "running"]);

/** Status of a run nobody knows anything about. */
export function blankStatus(runId: string): RunStatus {
  return {
    runId, state: "unknown", jobId: null, dispatchToken: null, attempt: null, exitCode: null, signal: null, checkpointed: false,
    failure: { reason: "unknown_to_cluster", detail: "the scheduler lists no job for this run and its folder shows no task" },
    progress: null, submittedAt: null, startedAt: null, finishedAt: null, stderrTail: "",
  };
}

/**
 * One run's status. Order of trust: our own submission newer than the listing (a resubmitted run
 * may still show its old task there), then the listing, then the markers the batch script left in
 * the run folder (for a task the scheduler has forgotten after MinJobAge).
 */
export function composeRunStatus(runId: string, e: RunEvidence): RunStatus {
  const f = e.folder;
  const attempts = f ? [...f.tokens.values()].filter((t) => t.startedAt).length : 0;
  const base = { ...blankStatus(runId), progress: f?.progress ?? null, stderrTail: f?.stderrTail ?? "", attempt: attempts || null };
  if (e.mine) {
    const state = e.cancelledJobId === e.mine.jobId ? "cancelled" : "queued";
    return { ...base, state, failure: null, jobId: e.mine.jobId, dispatchToken: e.mine.token, submittedAt: e.mine.at };
  }
  const v = e.view;
  if (v) {
    let m = mapSchedulerState(v.row, base.stderrTail);
    // A cancelled running task is listed as COMPLETING until its processes are gone; scancel took it.
    if (e.cancelledJobId === v.row.jobId && ACTIVE.has(m.state)) m = { ...m, state: "cancelled", failure: null };
    const finishedAt = ACTIVE.has(m.state) ? null : v.row.finishedAt;
    return { ...base, ...m, jobId: v.row.jobId, dispatchToken: v.task.token, submittedAt: v.row.submittedAt, startedAt: v.row.startedAt, finishedAt };
  }
  const latest = f ? [...f.tokens.entries()].filter(([, t]) => t.startedAt).sort((a, b) => a[1].startedAt.localeCompare(b[1].startedAt)).pop() : undefined;
  if (!latest) return base;
  const [token, t] = latest;
  const common = { ...base, jobId: t.jobId, dispatchToken: token, startedAt: t.startedAt, finishedAt: t.finishedAt };
  if (t.exitCode === null) return { ...common, state: "lost", failure: { reason: "node_lost", detail: "the scheduler no longer lists the task and it left no exit marker" } };
  const m = mapSchedulerState({ state: t.exitCode === 0 ? "COMPLETED" : "FAILED", reason: "from the run folder", waitStatus: t.exitCode << 8 }, base.stderrTail);
  return { ...common, ...m };
}
