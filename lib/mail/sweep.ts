import "server-only";
// Safety nets for the broker's periodic sweep: mail that no job will deliver any more, and
// failures that no digest will report, are queued again. Either can happen only after faults:
// a send-mail job that pg-boss gave up on (expired over and over while the broker was killed), or
// a run whose failure committed just after its ensemble's waiting digest job had been picked up,
// so that its own digest request was dropped as a duplicate.
import { QueryTypes } from "sequelize";
import { modelsFor } from "@/lib/db/models-for";
import { AppError } from "@/lib/errors";
import { BOSS_SCHEMA, ensureQueue } from "@/lib/queue/boss";
import { enqueue } from "@/lib/queue/enqueue";

const LIVE_JOB_STATES = "('created', 'retry', 'active')";

function seconds(n: number, what: string): number {
  if (!Number.isFinite(n) || n < 0) throw new AppError("bad_request", `${what} must be a non-negative number of seconds, got ${n}`);
  return n;
}

/** Queue send-mail again for pending messages untouched for `olderThanSeconds` with no live job; returns their ids. */
export async function requeueStrandedMail(options: { olderThanSeconds?: number } = {}): Promise<string[]> {
  const age = seconds(options.olderThanSeconds ?? 900, "olderThanSeconds");
  await ensureQueue("send-mail"); // the job table exists from here on
  const { sequelize } = modelsFor();
  const rows = await sequelize.query<{ id: string }>(
    `SELECT o.id::text AS id FROM outbox_messages o
      WHERE o.state = 'pending' AND o.updated_at < now() - make_interval(secs => $1)
        AND NOT EXISTS (SELECT 1 FROM ${BOSS_SCHEMA}.job j
                         WHERE j.name = 'send-mail' AND j.data->>'messageId' = o.id::text AND j.state::text IN ${LIVE_JOB_STATES})
      ORDER BY o.id LIMIT 1000`,
    { type: QueryTypes.SELECT, bind: [age] },
  );
  for (const r of rows) await enqueue("send-mail", { messageId: r.id });
  return rows.map((r) => r.id);
}

/**
 * Queue failure-digest for ensembles (that want failure mail) with a failed run whose failure
 * event is older than `olderThanSeconds` and not reported; returns the ensemble ids.
 * The digest queue keeps one waiting job per ensemble, so a digest already waiting absorbs this.
 */
export async function requeueUnreportedFailures(options: { olderThanSeconds?: number } = {}): Promise<string[]> {
  const age = seconds(options.olderThanSeconds ?? 600, "olderThanSeconds");
  const { sequelize } = modelsFor();
  const rows = await sequelize.query<{ ensemble_id: string }>(
    `SELECT DISTINCT r.ensemble_id FROM runs r
       JOIN ensembles en ON en.id = r.ensemble_id
       JOIN LATERAL (SELECT e.detail, e.created_at FROM run_events e
                      WHERE e.run_id = r.id AND e.to_state = 'failed' ORDER BY e.id DESC LIMIT 1) last ON true
      WHERE r.state = 'failed' AND last.detail->'reportedIn' IS NULL
        AND last.created_at < now() - make_interval(secs => $1)
        AND coalesce(en.spec #>> '{notify,onFailure}', 'true') <> 'false'
      LIMIT 1000`,
    { type: QueryTypes.SELECT, bind: [age] },
  );
  for (const r of rows) await enqueue("failure-digest", { ensembleId: r.ensemble_id }, { singletonKey: r.ensemble_id });
  return rows.map((r) => r.ensemble_id);
}
