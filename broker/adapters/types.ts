/**
 * The contract between the broker and a cluster. One adapter instance per cluster; every
 * method is a batch so that one call maps to one round trip (or one job array) where the
 * cluster allows it.
 */

/** Where a run is as the cluster sees it. The broker maps these onto its own run states. */
export type ClusterRunState =
  | "queued" // accepted, waiting for a slot / the scheduler
  | "running"
  | "exited" // ended on its own; exitCode says how
  | "timed_out" // stopped at its wall-time limit
  | "cancelled"
  | "lost" // the node lost track of it (node crash, restart)
  | "unknown"; // the cluster has no record of this run

/** Why a run did not end well; null for success, for queued/running and for cancelled runs. */
export type FailureReason =
  | "nonzero_exit" // the sampler exited with a code other than 0 (detail: stderr tail)
  | "killed_by_signal" // the sampler died of a signal nobody on our side sent
  | "launch_failed" // the sampler command could not be started
  | "wall_time_exceeded"
  | "node_lost"
  | "unknown_to_cluster";

/** Reasons where a resubmission (same outdir) can reasonably be expected to help. */
export const RETRYABLE_REASONS: ReadonlySet<FailureReason> = new Set(["wall_time_exceeded", "node_lost"]);

/** Failure description carried to the run's failure reason and the owner's e-mail. */
export interface RunFailure {
  reason: FailureReason;
  /** One or a few human lines: last stderr lines, the node's note. */
  detail: string;
}

/** Sampler progress as reported by its progress.json. */
export interface RunProgress {
  sweepsDone: number;
  sweepsTotal: number;
  updatedAt: string;
}

/** Resources requested for one run. */
export interface RunResources {
  cores: number;
  wallSeconds: number;
  memoryMb: number;
}

/** One run to stage: its id and the run.json document (format ergodex.run/1). */
export interface StageRequest {
  runId: string;
  runJson: { format: string; runId: string; [key: string]: unknown };
}

/** One run to submit. The dispatch token makes the submission idempotent. */
export interface SubmitRequest {
  runId: string;
  dispatchToken: string;
  resources: RunResources;
}

/** Outcome of submitting one run. */
export type SubmitResult =
  | {
    runId: string;
    accepted: true;
    /** Scheduler job id (for a job array later: "<array>_<index>"). */
    jobId: string;
    /** True when the cluster already had this run under the same token: nothing was started. */
    alreadySubmitted: boolean;
    state: ClusterRunState;
  }
  | { runId: string; accepted: false; error: { code: string; message: string } };

/** What the cluster knows about one run, from one status call. */
export interface RunStatus {
  runId: string;
  state: ClusterRunState;
  jobId: string | null;
  dispatchToken: string | null;
  attempt: number | null;
  exitCode: number | null;
  signal: string | null;
  /** True when the sampler said it wrote a checkpoint (exit code 3), so a resubmission resumes. */
  checkpointed: boolean;
  failure: RunFailure | null;
  progress: RunProgress | null;
  submittedAt: string | null;
  startedAt: string | null;
  finishedAt: string | null;
  stderrTail: string;
}

/** A file brought home by fetch, relative to the local directory. */
export interface FetchedFile {
  path: string;
  bytes: number;
}

/** The cluster's answer to a health probe. */
export interface ClusterHealth {
  ok: boolean;
  node: string;
  protocol: string;
  slots: number;
  running: number;
  queued: number;
}

/** Everything the broker needs from a cluster. */
export interface ClusterAdapter {
  /** Write each run's run.json into its work dir on the cluster (idempotent). */
  stage(runs: StageRequest[]): Promise<void>;
  /** Submit a batch; per-run job ids, or per-run refusals. Same token again is a no-op. */
  submit(runs: SubmitRequest[]): Promise<SubmitResult[]>;
  /** Status of the given runs (unknown ones come back as "unknown"), or of all active runs. */
  status(runIds?: string[]): Promise<RunStatus[]>;
  /** Download the run's result bundle folder into localDir. */
  fetch(runId: string, localDir: string): Promise<FetchedFile[]>;
  /** Cancel runs; queued ones never start, running ones are terminated. */
  cancel(runIds: string[]): Promise<RunStatus[]>;
  health(): Promise<ClusterHealth>;
  /** Drop the connection. */
  close(): Promise<void>;
}
