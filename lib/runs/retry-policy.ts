// Whether a failed attempt is tried again, from the ensemble spec's retry policy.
//
// spec.retry = { maxAttempts (1 = no retry), on: [reasons…], resumeOnWallTime }.
// A run stopped at its wall time is retried when resumeOnWallTime is set (or the reason is
// listed): the cluster reuses the run's out/ folder, so a sampler that wrote a checkpoint
// resumes from it. Every other reason is retried only if it is listed in `on`. Either way
// the attempts, wall-time resumptions included, never exceed maxAttempts.
import type { FailureReason } from "@/models/run";

/** The retry part of an ensemble spec. */
export type RetryPolicy = { maxAttempts: number; on: FailureReason[]; resumeOnWallTime: boolean };

/** Failures retrying cannot fix whatever the spec says: a user's cancel, or a bad configuration. */
const NEVER_RETRIED: ReadonlySet<FailureReason> = new Set(["cancelled_by_user"]);

/** The spec's retry policy, with the defaults of a spec that gives none (no retry). */
export function retryPolicyOf(spec: Record<string, unknown>): RetryPolicy {
  const r = (spec.retry ?? {}) as Partial<RetryPolicy>;
  const maxAttempts = Number.isInteger(r.maxAttempts) && (r.maxAttempts as number) >= 1 ? (r.maxAttempts as number) : 1;
  return { maxAttempts, on: Array.isArray(r.on) ? r.on : [], resumeOnWallTime: r.resumeOnWallTime === true };
}

/** The decision for one failed attempt, with a sentence for the run's event log. */
export function shouldRetry(policy: RetryPolicy, reason: FailureReason, attempt: number): { retry: boolean; why: string } {
  if (NEVER_RETRIED.has(reason)) return { retry: false, why: `${reason} is never retried` };
  const listed = policy.on.includes(reason) || (reason === "wall_time_exceeded" && policy.resumeOnWallTime);
  if (!listed) return { retry: false, why: `the retry policy does not cover ${reason}` };
  if (attempt >= policy.maxAttempts) return { retry: false, why: `attempt ${attempt} of at most ${policy.maxAttempts}` };
  return { retry: true, why: `${reason}: attempt ${attempt + 1} of at most ${policy.maxAttempts}` };
}
