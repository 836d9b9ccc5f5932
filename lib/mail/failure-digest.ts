import "server-only";
// One e-mail to an ensemble's owner covering every failure not reported yet: the work of the
// "failure-digest" job, which the broker queues (singleton per ensemble, a short delay) whenever
// a run fails, so failures arriving close together share one message.
//
// Which failures were reported is recorded on the failure itself: the RunEvent that moved the run
// to "failed" gets detail.reportedIn = <outbox message id> in the same transaction that writes the
// e-mail. A flag per event, rather than a high-water mark of event ids, cannot skip an event whose
// transaction committed after a later one. A run counts while it is still failed: a run the retry
// policy re-queued is not the owner's problem yet, and its next failure is a new event.
import { QueryTypes, type Transaction } from "sequelize";
import { env } from "@/lib/env";
import { AppError } from "@/lib/errors";
import { modelsFor } from "@/lib/db/models-for";
import { enqueueMail } from "./enqueue-mail";
import { composeFailureDigest, type FailedRunLine } from "./failure-digest-text";

/** What a digest did: "sent" wrote one e-mail; "nothing-new" and "disabled" wrote none. */
export type DigestOutcome =
  | { status: "sent"; messageId: string; runIds: string[] }
  | { status: "nothing-new" | "disabled"; runIds: [] };

type Row = {
  event_id: string; run_id: string; point_index: number; params: Record<string, unknown>; replica: number; attempt: number;
  failure_reason: string | null; exit_code: number | null; failure_detail: string | null; stderr_tail: string | null;
};

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

/** Whether the spec asks for failure e-mails (the spec schema's default is yes). */
export function wantsFailureMail(spec: Record<string, unknown> | null | undefined): boolean {
  const notify = (spec?.notify ?? {}) as { onFailure?: unknown };
  return notify.onFailure !== false;
}

/** Lock and return the unreported failure events of the ensemble's currently failed runs. */
async function unreportedFailures(ensembleId: string, transaction: Transaction): Promise<Row[]> {
  const { sequelize } = modelsFor(transaction);
  // The latest event into "failed" of each failed run is the one describing its current failure.
  const latest = await sequelize.query<{ event_id: string }>(
    `SELECT DISTINCT ON (r.id) e.id::text AS event_id
       FROM runs r JOIN run_events e ON e.run_id = r.id AND e.to_state = 'failed'
      WHERE r.ensemble_id = $1 AND r.state = 'failed'
      ORDER BY r.id, e.id DESC`,
    { type: QueryTypes.SELECT, transaction, bind: [ensembleId] },
  );
  if (latest.length === 0) return [];
  // SKIP LOCKED: a digest running at the same moment owns those events; this one leaves them to it.
  const locked = await sequelize.query<{ id: string }>(
    `SELECT id::text AS id FROM run_events
      WHERE id = ANY($1::bigint[]) AND detail->'reportedIn' IS NULL
      FOR UPDATE SKIP LOCKED`,
    { type: QueryTypes.SELECT, transaction, bind: [latest.map((l) => l.event_id)] },
  );
  if (locked.length === 0) return [];
  return sequelize.query<Row>(
    `SELECT e.id::text AS event_id, r.id AS run_id, p.point_index, p.params, r.replica, r.attempt,
            r.failure_reason, r.exit_code, r.failure_detail, r.stderr_tail
       FROM run_events e JOIN runs r ON r.id = e.run_id JOIN parameter_points p ON p.id = r.point_id
      WHERE e.id = ANY($1::bigint[])
      ORDER BY p.point_index, r.replica`,
    { type: QueryTypes.SELECT, transaction, bind: [locked.map((l) => l.id)] },
  );
}

/** Write (at most) one failure e-mail for ensemble `ensembleId` to its owner; see the top of this file. */
export async function sendFailureDigest(ensembleId: string): Promise<DigestOutcome> {
  if (typeof ensembleId !== "string" || !UUID.test(ensembleId)) throw new AppError("bad_request", `ensemble id ${JSON.stringify(ensembleId)} is not a uuid`);
  const { sequelize, Ensemble, User, Sampler } = modelsFor();
  return sequelize.transaction(async (transaction): Promise<DigestOutcome> => {
    const ensemble = await Ensemble.findByPk(ensembleId, { transaction });
    if (!ensemble) throw new AppError("not_found", `ensemble ${ensembleId} does not exist`);
    if (!wantsFailureMail(ensemble.spec)) return { status: "disabled", runIds: [] };
    const rows = await unreportedFailures(ensembleId, transaction);
    if (rows.length === 0) return { status: "nothing-new", runIds: [] };
    const [owner, sampler] = await Promise.all([
      User.findByPk(ensemble.ownerId, { transaction, attributes: ["email", "name"] }),
      Sampler.findByPk(ensemble.samplerId, { transaction, attributes: ["name", "version"] }),
    ]);
    if (!owner) throw new AppError("internal", `ensemble ${ensembleId} has no owner row`);
    const runs: FailedRunLine[] = rows.map((r) => ({
      runId: r.run_id, pointIndex: r.point_index, params: r.params, replica: r.replica, attempt: r.attempt,
      failureReason: r.failure_reason, exitCode: r.exit_code, failureDetail: r.failure_detail, stderrTail: r.stderr_tail,
    }));
    const { subject, text } = composeFailureDigest(
      { id: ensemble.id, name: ensemble.name, sampler: sampler ? `${sampler.name} ${sampler.version}` : "unknown sampler", ownerName: owner.name },
      runs, env.appUrl,
    );
    const firstEvent = rows.map((r) => BigInt(r.event_id)).reduce((a, b) => (b < a ? b : a));
    const mail = await enqueueMail(
      { to: [owner.email], subject, textBody: text, kind: "run.failed", dedupeKey: `failure-digest:${ensembleId}:${firstEvent}` },
      { transaction },
    );
    await sequelize.query(
      `UPDATE run_events SET detail = detail || jsonb_build_object('reportedIn', $1::text, 'reportedAt', now())
        WHERE id = ANY($2::bigint[])`,
      { transaction, bind: [mail.id, rows.map((r) => r.event_id)] },
    );
    return { status: "sent", messageId: mail.id, runIds: runs.map((r) => r.runId) };
  });
}
