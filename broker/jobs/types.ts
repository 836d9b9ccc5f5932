// The shape of a job definition: one file per job under broker/jobs/, listed in broker/registry.ts.
import type { Logger } from "pino";
import type { QueueName } from "@/lib/queue/queues";

/** How pg-boss retries a job whose handler threw a transient fault. */
export type RetryRule = {
  /** Retries after the first try (0 = never retried). */
  limit: number;
  /** Delay before the first retry, in seconds. */
  delaySeconds: number;
  /** Double the delay on every further retry. */
  backoff: boolean;
};

/** What a handler gets besides its payload. */
export type JobContext = { jobId: string; retryCount: number; log: Logger };

/** A job: its queue name, payload schema (JSON Schema 2020-12), handler and retry rule. */
export type JobDefinition<T = Record<string, unknown>> = {
  name: QueueName;
  schema: object;
  handle: (data: T, ctx: JobContext) => Promise<unknown>;
  retry: RetryRule;
  /** Seconds a job may run before pg-boss takes it for dead and retries it (default 120). */
  expireInSeconds?: number;
  /** Jobs of this queue handled at once in this process (default 1). */
  concurrency?: number;
  /** A pg-boss cron schedule: the broker queues one job (empty payload) at each tick. */
  schedule?: { cron: string; tz?: string };
};

/**
 * Thrown by a handler for a fault no retry can fix (bad payload, a row that does not exist):
 * the job is failed for good with the reason, not retried.
 */
export class PermanentJobError extends Error {
  constructor(message: string, options?: { cause?: unknown }) {
    super(message, options);
    this.name = "PermanentJobError";
  }
}

/** Define a job (typed payload); a plain identity that keeps the payload type. */
export function defineJob<T>(job: JobDefinition<T>): JobDefinition<T> {
  return job;
}
