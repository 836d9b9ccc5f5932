// How a job definition becomes pg-boss workers, and where "retry or not" is decided.
//
// Not retried (failed for good, the reason in the job's output): a payload that fails its
// schema, a PermanentJobError, an AppError saying the input is wrong or gone (invalid,
// bad_request, not_found), and a ClusterError marked non-transient (host key, refused key,
// protocol). Retried with the definition's backoff: everything else — connection drops,
// timeouts, database hiccups, unexpected errors.
import type PgBoss from "pg-boss";
import type { Logger } from "pino";
import { AppError } from "@/lib/errors";
import { validate } from "@/lib/validation";
import { BOSS_SCHEMA } from "@/lib/queue/boss";
import { policyFor } from "@/lib/queue/queues";
import { ClusterError } from "@/broker/adapters/errors";
import { PermanentJobError, type JobDefinition } from "./types";

/** Whether err is a fault no retry can fix. */
export function isPermanent(err: unknown): boolean {
  if (err instanceof PermanentJobError) return true;
  if (err instanceof AppError) return ["invalid", "bad_request", "not_found", "forbidden"].includes(err.code);
  if (err instanceof ClusterError) return !err.transient;
  return false;
}

/** The queue options a definition implies (policy from lib/queue/queues.ts, retry and expiry from the definition). */
export function queueOptions(def: JobDefinition<never>): PgBoss.Queue {
  return {
    name: def.name, policy: policyFor(def.name),
    retryLimit: def.retry.limit, retryDelay: def.retry.delaySeconds, retryBackoff: def.retry.backoff,
    expireInSeconds: def.expireInSeconds ?? 120,
  };
}

/** Create/update the definition's queue and start its workers. */
export async function startWorkers(boss: PgBoss, def: JobDefinition<never>, log: Logger, pollingIntervalSeconds: number): Promise<void> {
  const options = queueOptions(def);
  await boss.createQueue(def.name, options);
  await boss.updateQueue(def.name, options); // a sender may have created it first, with defaults
  if (def.schedule) await boss.schedule(def.name, def.schedule.cron, {}, { tz: def.schedule.tz ?? "UTC" });
  const handler = async (jobs: PgBoss.JobWithMetadata<unknown>[]) => {
    for (const job of jobs) await runOne(boss, def, job, log);
  };
  for (let i = 0; i < (def.concurrency ?? 1); i++) {
    await boss.work(def.name, { batchSize: 1, includeMetadata: true, pollingIntervalSeconds }, handler);
  }
}

async function runOne(boss: PgBoss, def: JobDefinition<never>, job: PgBoss.JobWithMetadata<unknown>, log: Logger): Promise<void> {
  const jobLog = log.child({ job: def.name, jobId: job.id, retryCount: job.retryCount });
  try {
    const data = validate<never>(def.schema, job.data ?? {}, `payload of ${def.name} job ${job.id}`);
    await def.handle(data, { jobId: job.id, retryCount: job.retryCount, log: jobLog });
  } catch (err) {
    if (isPermanent(err)) {
      jobLog.error({ err }, "job failed permanently (not retried)");
      // pg-boss retries while retry_count < retry_limit: closing that gap fails the job for good.
      await boss.getDb().executeSql(`UPDATE ${BOSS_SCHEMA}.job SET retry_limit = retry_count WHERE name = $1 AND id = $2`, [def.name, job.id]);
    } else {
      jobLog.warn({ err }, "job failed; pg-boss retries it with backoff");
    }
    throw err;
  }
}
