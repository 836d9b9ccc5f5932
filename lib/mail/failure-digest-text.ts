// The words of a failure digest: which ensemble, which runs, why, and where to look. Pure, so
// the wording can be read and tested without a database.
import type { FailureReason } from "@/models/run";

/** One failed run as the digest describes it. */
export type FailedRunLine = {
  runId: string;
  pointIndex: number;
  params: Record<string, unknown>;
  replica: number;
  attempt: number;
  failureReason: FailureReason | string | null;
  exitCode: number | null;
  failureDetail: string | null;
  stderrTail: string | null;
};

/** The ensemble the digest is about. */
export type DigestEnsemble = { id: string; name: string; sampler: string; ownerName: string };

/** Runs described in full; the rest are counted, and the ensemble page lists them all. */
export const DIGEST_MAX_LISTED = 50;
/** Lines of stderr quoted per run. */
export const DIGEST_STDERR_LINES = 8;

const REASONS: Record<string, string> = {
  nonzero_exit: "the sampler exited with a non-zero status",
  wall_time_exceeded: "the run reached its wall-time limit",
  node_lost: "the cluster lost the node (or the run) it was on",
  connection_lost: "the connection to the cluster was lost",
  import_rejected: "its result bundle was rejected at import",
  dispatch_failed: "it could not be submitted to the cluster",
  cancelled_by_user: "it was cancelled",
};

/** A failure reason in words, with its code. */
export function describeReason(reason: string | null): string {
  if (!reason) return "no reason recorded";
  return `${REASONS[reason] ?? "failed"} (${reason})`;
}

/** The first 8 hex digits of a uuid: what people quote in conversation. */
export const shortId = (id: string) => id.replace(/-/g, "").slice(0, 8);

/** Point parameters as "L=16 T=2.3 algorithm=wolff", keys in the stored order. */
export function formatParams(params: Record<string, unknown>): string {
  const parts = Object.entries(params ?? {}).map(([k, v]) => `${k}=${typeof v === "string" ? v : JSON.stringify(v)}`);
  return parts.length ? parts.join(" ") : "(no parameters)";
}

/** The last `n` non-empty lines of a stderr tail. */
export function lastLines(text: string | null, n = DIGEST_STDERR_LINES): string[] {
  if (!text) return [];
  return text.split(/\r?\n/).map((l) => l.replace(/\s+$/, "")).filter((l) => l.length > 0).slice(-n);
}

function runBlock(run: FailedRunLine, appUrl: string): string[] {
  const lines = [
    `Run ${shortId(run.runId)}  point #${run.pointIndex} ${formatParams(run.params)}  replica ${run.replica}  attempt ${run.attempt}`,
    `  why: ${describeReason(run.failureReason)}${run.exitCode !== null && run.exitCode !== undefined ? `, exit code ${run.exitCode}` : ""}`,
  ];
  if (run.failureDetail) lines.push(`  detail: ${run.failureDetail.replace(/\s+/g, " ").slice(0, 500)}`);
  const tail = lastLines(run.stderrTail);
  if (tail.length) lines.push("  last stderr lines:", ...tail.map((l) => `    | ${l.slice(0, 300)}`));
  lines.push(`  ${appUrl}/runs/${run.runId}`);
  return lines;
}

/** Subject and plain-text body of one digest for `runs` (at least one) of `ensemble`. */
export function composeFailureDigest(ensemble: DigestEnsemble, runs: FailedRunLine[], appUrl: string): { subject: string; text: string } {
  if (runs.length === 0) throw new Error("composeFailureDigest: a digest needs at least one failed run");
  const n = runs.length;
  const subject = `[Ergodex] ${n} run${n === 1 ? "" : "s"} failed in ensemble "${ensemble.name.replace(/[\r\n]+/g, " ").slice(0, 200)}"`;
  const byReason = new Map<string, number>();
  for (const r of runs) byReason.set(r.failureReason ?? "unknown", (byReason.get(r.failureReason ?? "unknown") ?? 0) + 1);
  const listed = runs.slice(0, DIGEST_MAX_LISTED);
  const body = [
    `Hello ${ensemble.ownerName},`,
    "",
    `${n} run${n === 1 ? " has" : "s have"} failed in your ensemble "${ensemble.name}" (${ensemble.sampler}).`,
    `Ensemble: ${appUrl}/ensembles/${ensemble.id}`,
    `By reason: ${[...byReason].map(([reason, count]) => `${reason} ${count}`).join(", ")}`,
    "",
    ...listed.flatMap((r) => [...runBlock(r, appUrl), ""]),
    ...(n > listed.length ? [`… and ${n - listed.length} more failed runs, listed on the ensemble page.`, ""] : []),
    "Failed runs can be resubmitted from the ensemble page once the cause is fixed.",
    "You receive this because you own the ensemble; notify.onFailure: false in its spec turns these e-mails off.",
  ];
  return { subject, text: body.join("\n") };
}
