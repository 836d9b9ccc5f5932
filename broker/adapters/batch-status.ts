import { ClusterProtocolError } from "./errors";
import type { ClusterRunState, RunFailure } from "./types";

/**
 * Reading the batch scheduler's job listing and turning its states into the adapter's.
 * Only what the scheduler offers without an accounting database: its job listing with all
 * states (finished jobs stay listed for MinJobAge seconds), which also carries the raw wait
 * status of every finished task.
 */

/** Fields asked of `squeue -O`; "|" ends each field so names with spaces parse. */
const FIELDS = ["JobArrayID", "ArrayJobID", "ArrayTaskID", "Name", "State", "Reason", "exit_code", "SubmitTime", "StartTime", "EndTime"];

/**
 * One listing of every job of the cluster user, one line per array task, in every state.
 * SLURM_TIME_FORMAT=%s makes the times epoch seconds, so the login node's time zone does not matter.
 */
export function squeueCommand(user: string): string {
  return `SLURM_TIME_FORMAT=%s squeue --noheader --array --states=all --user=${user} --Format='${FIELDS.map((f) => `${f}:|`).join(",")}'`;
}

/** One array task (or plain job) as the scheduler lists it. */
export interface SchedulerRow {
  jobId: string;
  arrayJobId: string;
  /** Index inside its array; null for a job that is not an array. */
  taskIndex: number | null;
  name: string;
  state: string;
  reason: string;
  /** Raw wait status (exit code << 8 | signal); null when not reported. */
  waitStatus: number | null;
  submittedAt: string | null;
  startedAt: string | null;
  finishedAt: string | null;
}

function epoch(field: string): string | null {
  if (!/^\d+$/.test(field) || field === "0") return null;
  return new Date(Number(field) * 1000).toISOString();
}

/** Parse the output of squeueCommand; a line that does not fit names its number. */
export function parseSqueue(text: string): SchedulerRow[] {
  const rows: SchedulerRow[] = [];
  text.split("\n").forEach((line, i) => {
    if (line.trim() === "") return;
    const f = line.split("|").map((x) => x.trim());
    if (f.length < FIELDS.length) {
      throw new ClusterProtocolError(`job listing line ${i + 1} has ${f.length} fields, expected ${FIELDS.length}: "${line.slice(0, 200)}"`);
    }
    const [jobId, arrayJobId, task, name, state, reason, exit, submit, start, end] = f;
    rows.push({
      jobId,
      arrayJobId,
      taskIndex: /^\d+$/.test(task) ? Number(task) : null,
      name,
      // "CANCELLED by 1001" → CANCELLED; a "+" suffix (e.g. COMPLETING+) is dropped.
      state: state.split(/[ +]/)[0].toUpperCase(),
      reason,
      waitStatus: /^\d+$/.test(exit) ? Number(exit) : null,
      submittedAt: epoch(submit),
      startedAt: epoch(start),
      finishedAt: epoch(end),
    });
  });
  return rows;
}

/** Exit code and signal number from a raw wait status, as waitpid encodes them. */
export function decodeWaitStatus(ws: number | null): { exitCode: number | null; signal: number | null } {
  if (ws === null) return { exitCode: null, signal: null };
  const sig = ws & 0x7f;
  return sig === 0 ? { exitCode: (ws >> 8) & 0xff, signal: null } : { exitCode: null, signal: sig };
}

const SIGNAL_NAMES: Record<number, string> = { 1: "SIGHUP", 2: "SIGINT", 6: "SIGABRT", 9: "SIGKILL", 11: "SIGSEGV", 15: "SIGTERM" };

/** The sampler's exit code for "stopped by SIGTERM, checkpoint written" (cluster-fake/samplers/README.md). */
export const EXIT_CHECKPOINTED = 3;

/** Scheduler state → adapter state, before exit codes are looked at. */
const STATE_MAP: Record<string, ClusterRunState> = {
  PENDING: "queued", CONFIGURING: "queued", REQUEUED: "queued", REQUEUE_HOLD: "queued", REQUEUE_FED: "queued",
  RESV_DEL_HOLD: "queued", SUSPENDED: "running", RUNNING: "running", COMPLETING: "running", SIGNALING: "running",
  STAGE_OUT: "running", RESIZING: "running", STOPPED: "running",
  COMPLETED: "exited", FAILED: "exited", OUT_OF_MEMORY: "exited", SPECIAL_EXIT: "exited", REVOKED: "exited",
  TIMEOUT: "timed_out", DEADLINE: "timed_out", CANCELLED: "cancelled",
  NODE_FAIL: "lost", BOOT_FAIL: "lost", PREEMPTED: "lost",
};

/** What one scheduler row means for a run. */
export interface MappedState {
  state: ClusterRunState;
  exitCode: number | null;
  signal: string | null;
  checkpointed: boolean;
  failure: RunFailure | null;
}

function withTail(text: string, tail: string): string {
  const t = tail.trimEnd().split("\n").filter((l) => l.trim() !== "").slice(-3).join("\n");
  return t ? `${text}: ${t}` : text;
}

/**
 * Map a scheduler state plus the task's wait status to the adapter's state and failure.
 * A task that FAILED with exit 3 was stopped by the wall-time warning signal the adapter asks
 * for (sbatch --signal=B:TERM@…) and wrote its checkpoint: that is a wall-time stop, not a fault.
 */
export function mapSchedulerState(row: Pick<SchedulerRow, "state" | "reason" | "waitStatus">, stderrTail = ""): MappedState {
  const { exitCode, signal: sigNo } = decodeWaitStatus(row.waitStatus);
  const signal = sigNo === null ? null : SIGNAL_NAMES[sigNo] ?? `signal ${sigNo}`;
  const checkpointed = exitCode === EXIT_CHECKPOINTED;
  const base = { exitCode, signal, checkpointed };
  const state = STATE_MAP[row.state];
  switch (state) {
    case undefined:
      return { ...base, state: "lost", failure: { reason: "node_lost", detail: `the scheduler reports an unknown job state "${row.state}" (${row.reason})` } };
    case "queued":
    case "running":
      return { ...base, checkpointed: false, state, failure: null };
    case "cancelled":
      return { ...base, state, failure: null };
    case "lost":
      return { ...base, state, failure: { reason: "node_lost", detail: `the scheduler reports ${row.state} (${row.reason})` } };
    case "timed_out":
      return {
        ...base, state,
        failure: { reason: "wall_time_exceeded", detail: checkpointed ? "stopped at its wall-time limit; checkpoint written" : `stopped at its wall-time limit (${row.state}) without a checkpoint` },
      };
    case "exited":
      break;
  }
  if (row.state === "OUT_OF_MEMORY") {
    // No reason of its own in the adapter vocabulary: an OOM kill is a SIGKILL from outside the sampler.
    return { ...base, state: "exited", failure: { reason: "killed_by_signal", detail: withTail("out of memory: the scheduler killed the task at its memory limit", stderrTail) } };
  }
  if (row.state === "FAILED" && checkpointed) {
    return { ...base, state: "timed_out", failure: { reason: "wall_time_exceeded", detail: "stopped by the wall-time warning signal before its limit; checkpoint written" } };
  }
  if (signal !== null) return { ...base, state: "exited", failure: { reason: "killed_by_signal", detail: withTail(`killed by ${signal}`, stderrTail) } };
  // The batch script exits 128+N when its sampler died of signal N (the shell's convention).
  if (exitCode !== null && exitCode > 128 && exitCode <= 128 + 64) {
    const n = exitCode - 128;
    return { ...base, state: "exited", failure: { reason: "killed_by_signal", detail: withTail(`killed by ${SIGNAL_NAMES[n] ?? `signal ${n}`}`, stderrTail) } };
  }
  if (exitCode === 0 && row.state === "COMPLETED") return { ...base, state: "exited", failure: null };
  if (exitCode === null) return { ...base, state: "exited", failure: { reason: "launch_failed", detail: `the scheduler reports ${row.state} (${row.reason}) without an exit status` } };
  if (exitCode === 0) return { ...base, state: "exited", failure: { reason: "launch_failed", detail: `the scheduler reports ${row.state} (${row.reason}) with exit code 0` } };
  // 126/127: the shell could not run the sampler command (not executable / not found).
  if (exitCode === 126 || exitCode === 127) return { ...base, state: "exited", failure: { reason: "launch_failed", detail: withTail(`the sampler command could not be started (exit code ${exitCode})`, stderrTail) } };
  return { ...base, state: "exited", failure: { reason: "nonzero_exit", detail: withTail(`exit code ${exitCode}`, stderrTail) } };
}
