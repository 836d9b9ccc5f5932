// The queue names of the contract and how each one deduplicates. Senders (web and broker) and
// workers share this table, so whichever process creates a queue first creates it right.
import type PgBoss from "pg-boss";

/** Every queue the project uses (the contract's job names). */
export const QUEUE_NAMES = [
  "dispatch-runs", "poll-clusters", "collect-run", "cancel-runs", "send-mail", "failure-digest", "check-allocation",
  "verify-manuscript", "replay-run", "allocation-digest",
] as const;

export type QueueName = (typeof QUEUE_NAMES)[number];

/**
 * pg-boss policy per queue. "short" keeps at most one *waiting* job per singletonKey, which is
 * what turns many failures of one ensemble into one digest, many poll requests into one poll and
 * many settlements into one allocation check; enqueue() keys a job without a key by its payload.
 * Everything else is "standard": a singletonKey alone does not deduplicate there, and the
 * handlers are idempotent instead.
 */
export const QUEUE_POLICY: Record<QueueName, PgBoss.QueuePolicy> = {
  "dispatch-runs": "standard",
  "poll-clusters": "short",
  "collect-run": "standard",
  "cancel-runs": "standard",
  "send-mail": "standard",
  "failure-digest": "short",
  "check-allocation": "short",
  "verify-manuscript": "standard",
  "replay-run": "standard",
  "allocation-digest": "short",
};

/** The policy a queue is created with (unknown names get pg-boss's standard policy). */
export function policyFor(name: string): PgBoss.QueuePolicy {
  return (QUEUE_POLICY as Record<string, PgBoss.QueuePolicy>)[name] ?? "standard";
}
