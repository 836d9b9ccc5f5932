// Watch: one status call for a cluster's active runs, then each run's state, progress and
// outcome recorded. A run that exited 0 goes to collecting and gets its collect-run job in the
// same transaction; any other end goes through failRun (retry policy, settlement, digest).
import type { Logger } from "pino";
import { db, type Cluster, type Run } from "@/models";
import { AppError } from "@/lib/errors";
import { enqueue } from "@/lib/queue/enqueue";
import { transitionRun } from "@/lib/runs/transition-run";
import { failRun, type AttemptFailure } from "@/lib/runs/fail-run";
import { attemptCoreHours } from "@/lib/runs/attempt-core-hours";
import { settleRun } from "@/lib/allocations/settle-run";
import { afterRunFinal, lockEnsemble } from "@/lib/runs/after-run-final";
import type { ClusterAdapter, RunStatus } from "@/broker/adapters/types";
import type { FailureReason } from "@/models/run";
import { loadRuns, runIdsOnCluster } from "./cluster-runs";

/** What one poll of a cluster saw. */
export type PollOutcome = { watched: number; started: number; finished: number; failed: number; retried: number; cancelled: number };

/** The adapter's failure vocabulary mapped onto the run's failure reasons. */
export function reasonOf(s: RunStatus): FailureReason {
  switch (s.failure?.reason) {
    case "wall_time_exceeded": return "wall_time_exceeded";
    case "launch_failed": return "dispatch_failed";
    case "node_lost":
    case "unknown_to_cluster": return "node_lost";
    default: return "nonzero_exit"; // nonzero_exit, killed_by_signal
  }
}

const date = (s: string | null | undefined) => (s ? new Date(s) : null);

/** The cluster's times for the patch, leaving out what it does not know (undefined would be written as NULL). */
function times(s: RunStatus): { startedAt?: Date; finishedAt?: Date } {
  return { ...(s.startedAt ? { startedAt: new Date(s.startedAt) } : {}), ...(s.finishedAt ? { finishedAt: new Date(s.finishedAt) } : {}) };
}

/** Poll the cluster's dispatched and running runs (call under the cluster lock). */
export async function pollCluster(cluster: Cluster, adapter: ClusterAdapter, log: Logger): Promise<PollOutcome> {
  const out: PollOutcome = { watched: 0, started: 0, finished: 0, failed: 0, retried: 0, cancelled: 0 };
  const runs = await loadRuns(await runIdsOnCluster(cluster.id, ["dispatched", "running"]));
  if (runs.length === 0) return out;
  out.watched = runs.length;
  const statuses = new Map((await adapter.status(runs.map((r) => r.id))).map((s) => [s.runId, s]));
  for (const run of runs) {
    const s = statuses.get(run.id);
    if (!s) continue;
    try {
      await applyStatus(run, s, out);
    } catch (err) {
      // The run moved under us (a cancel): the next poll sees its new state.
      if (err instanceof AppError && err.code === "conflict") log.info({ runId: run.id, err: err.message }, "run changed while polling");
      else throw err;
    }
  }
  return out;
}

async function applyStatus(run: Run, s: RunStatus, out: PollOutcome): Promise<void> {
  const coreHours = attemptCoreHours(run.cores, s.startedAt, s.finishedAt);
  const progress = s.progress ? {
    sweepsDone: s.progress.sweepsDone, sweepsTotal: s.progress.sweepsTotal,
    progress: s.progress.sweepsTotal > 0 ? Math.min(1, s.progress.sweepsDone / s.progress.sweepsTotal) : 0,
  } : {};
  if (s.state !== "unknown" && s.dispatchToken !== run.dispatchToken) {
    return void (await fail(run, { reason: "node_lost", detail: `the cluster holds another submission of this run (token ${s.dispatchToken})` }, out));
  }
  switch (s.state) {
    case "queued":
      return;
    case "running":
      if (run.state === "dispatched") {
        await transitionRun(run.id, "running", { cause: "poll.running", patch: { ...times(s), ...progress } });
        out.started++;
      } else if (s.progress && s.progress.sweepsDone !== run.sweepsDone) {
        await run.update(progress); // progress is not a state change: no event
      }
      return;
    case "exited":
      if (s.exitCode === 0) {
        await db().sequelize.transaction(async (transaction) => {
          await transitionRun(run.id, "collecting", {
            cause: "poll.exited", transaction, detail: { coreHours, jobId: s.jobId },
            patch: { exitCode: 0, ...times(s), coreHoursUsed: coreHours, stderrTail: s.stderrTail || null, ...progress },
          });
          await enqueue("collect-run", { runId: run.id }, { transaction });
        });
        out.finished++;
        return;
      }
      return void (await fail(run, failureOf(s, coreHours), out));
    case "timed_out":
    case "lost":
    case "unknown":
      return void (await fail(run, failureOf(s, coreHours), out));
    case "cancelled":
      // Cancelled on the cluster by someone else than the broker: the run ends cancelled too.
      await db().sequelize.transaction(async (transaction) => {
        await lockEnsemble(run.ensembleId, transaction);
        const { run: r } = await transitionRun(run.id, "cancelled", {
          cause: "poll.cancelled-on-cluster", transaction, detail: { coreHours },
          patch: { ...times(s), coreHoursUsed: coreHours },
        });
        await settleRun(run.id, { transaction });
        await afterRunFinal(r, { transaction });
      });
      out.cancelled++;
      return;
  }
}

function failureOf(s: RunStatus, coreHours: number): AttemptFailure {
  const detail = s.failure?.detail ?? `the cluster reports ${s.state}`;
  return {
    reason: reasonOf(s),
    detail: s.state === "timed_out" && s.checkpointed ? `${detail} (checkpoint written)` : detail,
    stderrTail: s.stderrTail || null, exitCode: s.exitCode, coreHours,
    startedAt: date(s.startedAt), finishedAt: date(s.finishedAt),
  };
}

async function fail(run: Run, failure: AttemptFailure, out: PollOutcome): Promise<void> {
  const { retried } = await failRun(run.id, failure, { cause: `poll.${failure.reason}` });
  if (retried) out.retried++;
  else out.failed++;
}
