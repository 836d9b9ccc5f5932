import { Ajv, type ValidateFunction } from "ajv";
import { ClusterProtocolError } from "./errors";
import type { ClusterRunState, RunFailure, RunStatus } from "./types";

/**
 * The broker's side of the `ergodex-node` exec protocol (docs/fake-cluster.md): the shapes
 * it expects back, checked on arrival, and their translation into adapter vocabulary.
 */

export const NODE_COMMAND = "ergodex-node";
/** Sampler exit code meaning "interrupted, checkpoint written" (samplers CLI contract). */
export const EXIT_CHECKPOINTED = 3;

const NODE_STATES = ["queued", "running", "exited", "timed_out", "cancelled", "lost"] as const;

/** One run record as the node reports it. */
export interface NodeRunRecord {
  runId: string;
  jobId: string;
  token: string;
  attempt: number;
  state: (typeof NODE_STATES)[number];
  submittedAt: string;
  startedAt: string | null;
  finishedAt: string | null;
  exitCode: number | null;
  signal: string | null;
  stderrTail: string;
  note: string | null;
  progress: { sweepsDone: number; sweepsTotal: number; updatedAt: string } | null;
}

export interface NodeReport {
  time: string;
  runs: NodeRunRecord[];
  unknown: string[];
}

export type NodeSubmitResult =
  | { runId: string; ok: true; created: boolean; run: NodeRunRecord }
  | { runId: string; ok: false; error: { code: string; message: string } };

const nullable = (type: string) => ({ type: [type, "null"] });
const record = {
  type: "object",
  required: ["runId", "jobId", "token", "attempt", "state", "submittedAt", "startedAt", "finishedAt",
    "exitCode", "signal", "stderrTail", "note", "progress"],
  properties: {
    runId: { type: "string" }, jobId: { type: "string" }, token: { type: "string" },
    attempt: { type: "integer" }, state: { enum: NODE_STATES },
    submittedAt: { type: "string" }, startedAt: nullable("string"), finishedAt: nullable("string"),
    exitCode: nullable("integer"), signal: nullable("string"), stderrTail: { type: "string" }, note: nullable("string"),
    progress: {
      oneOf: [{ type: "null" }, {
        type: "object", required: ["sweepsDone", "sweepsTotal", "updatedAt"],
        properties: { sweepsDone: { type: "number" }, sweepsTotal: { type: "number" }, updatedAt: { type: "string" } },
      }],
    },
  },
};

const ajv = new Ajv({ allErrors: true });
const validators = {
  report: ajv.compile<NodeReport>({
    type: "object", required: ["runs", "unknown"],
    properties: { runs: { type: "array", items: record }, unknown: { type: "array", items: { type: "string" } } },
  }),
  submit: ajv.compile<{ results: NodeSubmitResult[] }>({
    type: "object", required: ["results"],
    properties: {
      results: {
        type: "array",
        items: {
          type: "object", required: ["runId", "ok"],
          properties: { runId: { type: "string" }, ok: { type: "boolean" }, run: record },
        },
      },
    },
  }),
};

function check<T>(kind: string, v: ValidateFunction<T>, body: unknown): T {
  if (!v(body)) {
    const e = v.errors!.slice(0, 3).map((x) => `${x.instancePath || "/"} ${x.message}`).join("; ");
    throw new ClusterProtocolError(`unexpected "${kind}" reply from the node: ${e}`);
  }
  return body;
}

/** Check a report reply; the error names the field that is off. */
export const checkReport = (body: unknown): NodeReport => check("report", validators.report, body);
/** Check a submit reply; the error names the field that is off. */
export const checkSubmit = (body: unknown): { results: NodeSubmitResult[] } => check("submit", validators.submit, body);

function lastLines(text: string, n: number): string {
  return text.trimEnd().split("\n").slice(-n).join("\n");
}

function failureOf(r: NodeRunRecord): RunFailure | null {
  const tail = lastLines(r.stderrTail, 3);
  switch (r.state) {
    case "timed_out":
      return { reason: "wall_time_exceeded", detail: r.note ?? "wall time exceeded" };
    case "lost":
      return { reason: "node_lost", detail: r.note ?? "the node lost the run" };
    case "exited":
      if (r.exitCode === 0) return null;
      if (r.exitCode !== null) return { reason: "nonzero_exit", detail: `exit code ${r.exitCode}${tail ? `: ${tail}` : ""}` };
      if (r.signal !== null) return { reason: "killed_by_signal", detail: `killed by ${r.signal}${tail ? `: ${tail}` : ""}` };
      return { reason: "launch_failed", detail: r.note ?? "the sampler could not be started" };
    default:
      return null;
  }
}

/** Translate a node record into the adapter's RunStatus. */
export function toRunStatus(r: NodeRunRecord): RunStatus {
  return {
    runId: r.runId,
    state: r.state as ClusterRunState,
    jobId: r.jobId,
    dispatchToken: r.token,
    attempt: r.attempt,
    exitCode: r.exitCode,
    signal: r.signal,
    checkpointed: r.exitCode === EXIT_CHECKPOINTED,
    failure: failureOf(r),
    progress: r.progress,
    submittedAt: r.submittedAt,
    startedAt: r.startedAt,
    finishedAt: r.finishedAt,
    stderrTail: r.stderrTail,
  };
}

/** Status for a run id the node has never heard of. */
export function unknownStatus(runId: string): RunStatus {
  return {
    runId, state: "unknown", jobId: null, dispatchToken: null, attempt: null, exitCode: null, signal: null,
    checkpointed: false, failure: { reason: "unknown_to_cluster", detail: "the cluster has no record of this run" },
    progress: null, submittedAt: null, startedAt: null, finishedAt: null, stderrTail: "",
  };
}
