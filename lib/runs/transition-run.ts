import "server-only";
// The one function through which every run state change goes.
//
// Allowed transitions (anything else is refused):
//
//   queued      → dispatched | failed | cancelled
//   dispatched  → running | collecting | failed | cancelled
//   running     → collecting | failed | cancelled
//   collecting  → done | failed | cancelled
//   failed      → queued          (a retry: attempt + 1, per-attempt fields cleared)
//   done, cancelled               (final)
//
// dispatched → collecting exists because a short chain can start and finish between two polls;
// the poller then never sees it running and should not invent a "running" event it did not see.
// A failed run stays failed unless retried: cancelling it would erase why it failed.
import type { Transaction } from "sequelize";
import { AppError } from "@/lib/errors";
import { modelsFor } from "@/lib/db/models-for";
import { FAILURE_REASONS, RUN_STATES, type Run, type RunAttributes, type RunState } from "@/models/run";
import type { RunEvent } from "@/models/run-event";

/** Which states each state may move to. */
export const RUN_TRANSITIONS: Readonly<Record<RunState, readonly RunState[]>> = {
  queued: ["dispatched", "failed", "cancelled"],
  dispatched: ["running", "collecting", "failed", "cancelled"],
  running: ["collecting", "failed", "cancelled"],
  collecting: ["done", "failed", "cancelled"],
  failed: ["queued"],
  done: [],
  cancelled: [],
};

/** Whether a run in `from` may move to `to`. */
export function canTransition(from: RunState, to: RunState): boolean {
  return RUN_TRANSITIONS[from]?.includes(to) ?? false;
}

/** Run fields a transition may set along with the state. */
export type RunPatch = Partial<Pick<RunAttributes,
  | "dispatchToken" | "schedulerJobId" | "workDir" | "dispatchedAt" | "startedAt" | "finishedAt"
  | "exitCode" | "failureReason" | "failureDetail" | "stderrTail" | "progress" | "sweepsDone"
  | "sweepsTotal" | "coreHoursUsed" | "samplerCommit" | "host" | "cores">>;

export type TransitionOptions = {
  /** Short machine-readable cause, e.g. "broker.dispatch", "poll.exit", "user.cancel", "retry". */
  cause: string;
  detail?: Record<string, unknown>;
  actorId?: string | null;
  /** Run inside the caller's transaction; otherwise one is opened (and committed) here. */
  transaction?: Transaction;
  patch?: RunPatch;
};

// Cleared on a retry: they describe the attempt that failed, which the RunEvent keeps.
const PER_ATTEMPT = ["dispatchToken", "schedulerJobId", "workDir", "dispatchedAt", "startedAt", "finishedAt",
  "exitCode", "failureReason", "failureDetail", "stderrTail", "coreHoursUsed", "samplerCommit", "host"] as const;

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

function checkInput(runId: string, toState: RunState, options: TransitionOptions): void {
  if (typeof runId !== "string" || !UUID.test(runId)) throw new AppError("bad_request", `run id ${JSON.stringify(runId)} is not a uuid`);
  if (!(RUN_STATES as readonly string[]).includes(toState)) {
    throw new AppError("bad_request", `run state "${String(toState)}" is not one of ${RUN_STATES.join(", ")}`);
  }
  if (typeof options?.cause !== "string" || options.cause.trim() === "") {
    throw new AppError("bad_request", `transition of run ${runId} to ${toState} needs a cause`);
  }
  const reason = options.patch?.failureReason;
  if (reason != null && !(FAILURE_REASONS as readonly string[]).includes(reason)) {
    throw new AppError("bad_request", `failure reason "${reason}" is not one of ${FAILURE_REASONS.join(", ")}`);
  }
  const p = options.patch?.progress;
  if (p !== undefined && !(p >= 0 && p <= 1)) throw new AppError("bad_request", `run progress must lie in [0, 1], got ${p}`);
}

/** The fields to write for `run` moving to `toState`, the patch included. */
function changesFor(run: Run, toState: RunState, patch: RunPatch, now: Date): Partial<RunAttributes> {
  const changes: Partial<RunAttributes> = { ...patch, state: toState };
  switch (toState) {
    case "queued":
      for (const field of PER_ATTEMPT) (changes as Record<string, unknown>)[field] = patch[field as keyof RunPatch] ?? null;
      Object.assign(changes, { attempt: run.attempt + 1, queuedAt: now, progress: 0, sweepsDone: 0 });
      break;
    case "dispatched":
      changes.dispatchedAt = patch.dispatchedAt ?? now;
      break;
    case "running":
      changes.startedAt = patch.startedAt ?? run.startedAt ?? now;
      break;
    case "collecting":
    case "done":
    case "failed":
    case "cancelled":
      changes.finishedAt = patch.finishedAt ?? run.finishedAt ?? now;
      break;
  }
  if (toState === "done") changes.progress = 1;
  if (toState === "failed" && !(changes.failureReason ?? run.failureReason)) {
    throw new AppError("bad_request", `run ${run.id} cannot fail without a failureReason (one of ${FAILURE_REASONS.join(", ")})`);
  }
  return changes;
}

/**
 * Move a run to `toState`: lock its row, check the transition, write the state, timestamps and
 * patch, and record a RunEvent, all in one transaction. Illegal transitions throw AppError "conflict".
 */
export async function transitionRun(
  runId: string,
  toState: RunState,
  options: TransitionOptions,
): Promise<{ run: Run; event: RunEvent }> {
  checkInput(runId, toState, options);
  const { sequelize, Run, RunEvent } = modelsFor(options.transaction);
  const work = async (transaction: Transaction) => {
    const run = await Run.findByPk(runId, { transaction, lock: transaction.LOCK.UPDATE });
    if (!run) throw new AppError("not_found", `run ${runId} does not exist`);
    const fromState = run.state as RunState;
    if (!canTransition(fromState, toState)) {
      const allowed = RUN_TRANSITIONS[fromState];
      throw new AppError("conflict", `run ${runId} cannot go from ${fromState} to ${toState} (allowed: ${allowed.length ? allowed.join(", ") : "none, it is final"})`,
        { runId, from: fromState, to: toState, allowed: [...allowed] });
    }
    const now = new Date();
    const detail = { ...(options.detail ?? {}) };
    if (toState === "queued") {
      detail.previousAttempt = { attempt: run.attempt, failureReason: run.failureReason, exitCode: run.exitCode, schedulerJobId: run.schedulerJobId };
    }
    await run.update(changesFor(run, toState, options.patch ?? {}, now), { transaction });
    const event = await RunEvent.create(
      { runId, fromState, toState, cause: options.cause, detail, actorId: options.actorId ?? null, createdAt: now },
      { transaction },
    );
    return { run, event };
  };
  return options.transaction ? work(options.transaction) : sequelize.transaction(work);
}

/**
 * Record the creation of new runs (an event from null to each run's current state), in the
 * caller's transaction: submission and upload write runs directly in their first state.
 */
export async function recordRunsCreated(
  runs: readonly Pick<RunAttributes, "id" | "state">[],
  options: Omit<TransitionOptions, "patch" | "transaction"> & { transaction: Transaction },
): Promise<RunEvent[]> {
  if (typeof options?.cause !== "string" || options.cause.trim() === "") throw new AppError("bad_request", "recording new runs needs a cause");
  const bad = runs.find((r) => !(RUN_STATES as readonly string[]).includes(r.state as string));
  if (bad) throw new AppError("bad_request", `run ${bad.id} has unknown state "${String(bad.state)}"`);
  const { RunEvent } = modelsFor(options.transaction);
  return RunEvent.bulkCreate(
    runs.map((r) => ({ runId: r.id, fromState: null, toState: r.state as RunState, cause: options.cause, detail: options.detail ?? {}, actorId: options.actorId ?? null })),
    { transaction: options.transaction, returning: true },
  );
}
