// Core-hours of one attempt, from the cluster's start and end times.

/** cores × elapsed hours between startedAt and finishedAt, rounded to the ledger's 4 decimals; 0 if it never started. */
export function attemptCoreHours(cores: number, startedAt: Date | string | null | undefined, finishedAt: Date | string | null | undefined): number {
  if (!Number.isInteger(cores) || cores < 1) throw new Error(`attemptCoreHours: cores must be a positive integer, got ${cores}`);
  if (!startedAt || !finishedAt) return 0;
  const ms = new Date(finishedAt).getTime() - new Date(startedAt).getTime();
  if (!Number.isFinite(ms)) throw new Error(`attemptCoreHours: unreadable times ${String(startedAt)} → ${String(finishedAt)}`);
  return Math.round(Math.max(0, ms) / 3_600_000 * cores * 1e4) / 1e4;
}
