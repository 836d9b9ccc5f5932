import "server-only";
// Replay of a run: request it (a provenance.replays row and a replay-run job in one transaction), read
// its state, and record what the replayed bundle came to against the archived one.
//
// Core-hours: a replay is explicitly NOT charged to the allocation. The ledger's charges settle
// reservations made at submission; a replay has none, is one chain already paid for once, and a
// charge without a reservation could overdraw an allocation that has since closed. The core-hours
// it used (cores × elapsed on the cluster) are recorded in its report (`coreHours`, `charged: false`)
// and in the audit entry of its completion, so a coordinator can see them.
import type { Transaction } from "sequelize";
import { recordAudit, type AuditSource } from "@/lib/audit/record-audit";
import type { Identity } from "@/lib/auth/identity";
import { modelsFor } from "@/lib/db/models-for";
import { AppError } from "@/lib/errors";
import { enqueue } from "@/lib/queue/enqueue";
import type { FileComparison } from "./compare-files";

/** Queue name of the replay job (broker/jobs/replay-run.ts). */
export const REPLAY_QUEUE = "replay-run";

/** Name, version and code hash of a sampler build, as its manifest states them. */
export type SamplerBuild = { name: string | null; version: string | null; commit: string | null };

/** What a finished replay found. */
export type ReplayReport = {
  outcome: "identical" | "differs" | "failed";
  /** One human line per difference (empty when identical). */
  differences: string[];
  files: FileComparison[];
  /** Files not compared, and why (progress.json carries a wall-clock time). */
  skipped: { path: string; why: string }[];
  sampler: { archived: SamplerBuild; replay: SamplerBuild | null };
  cluster: string | null;
  host: string | null;
  /** sha256 of the run.json staged for the replay, and of the run's own (they differ only in runId). */
  runJson: { replaySha256: string; runSha256: string } | null;
  coreHours: number;
  charged: false;
  error?: string;
};

/** A replay row as callers read it. */
export type ReplayStatus = {
  id: string; runId: string; state: "queued" | "running" | "identical" | "differs" | "failed"; samplerVersion: string | null;
  report: ReplayReport | null; requestedById: string | null; requestedByName: string | null; createdAt: Date; finishedAt: Date | null;
};

type RunRow = { id: string; state: string; source: string; groupId: string; clusterId: string | null };

async function runRow(runId: string, transaction?: Transaction): Promise<RunRow> {
  const rows = (await modelsFor(transaction).sequelize.query(
    `SELECT r.id, r.state, r.source, e.group_id AS "groupId", e.cluster_id AS "clusterId" FROM runs r JOIN ensembles e ON e.id = r.ensemble_id WHERE r.id = $1`,
    { bind: [runId], transaction, type: "SELECT" })) as RunRow[];
  if (!rows[0]) throw new AppError("not_found", `run ${runId} does not exist`);
  return rows[0];
}

/**
 * Queue a replay of run `runId` (the route's guard has checked the caller may act on it). Only a done
 * run that Ergodex ran on a cluster can be replayed: an uploaded run has no cluster to run again on.
 * A replay already queued or running for the run is returned instead of a second one.
 */
export async function requestReplay(audit: AuditSource, who: Identity, runId: string): Promise<{ id: string; created: boolean }> {
  const { sequelize } = modelsFor();
  return sequelize.transaction(async (transaction) => {
    // The run row is locked so that two requests at once make one replay.
    await sequelize.query(`SELECT 1 FROM runs WHERE id = $1 FOR SHARE`, { bind: [runId], transaction });
    const run = await runRow(runId, transaction);
    if (run.state !== "done") throw new AppError("conflict", `run ${runId} is ${run.state}: only a done run can be replayed`);
    if (run.source !== "cluster" || !run.clusterId) throw new AppError("conflict", `run ${runId} was not run by Ergodex on a cluster (uploaded results cannot be replayed)`);
    const open = (await sequelize.query(`SELECT id FROM provenance.replays WHERE run_id = $1 AND state IN ('queued', 'running') ORDER BY created_at LIMIT 1`,
      { bind: [runId], transaction, type: "SELECT" })) as { id: string }[];
    if (open[0]) return { id: open[0].id, created: false };
    const [row] = (await sequelize.query(`INSERT INTO provenance.replays (run_id, requested_by_id) VALUES ($1, $2) RETURNING id`,
      { bind: [runId, who.userId], transaction, type: "SELECT" })) as { id: string }[];
    await recordAudit(audit, "run.replay", { type: "run", id: runId, groupId: run.groupId }, { replayId: row.id }, transaction);
    await enqueue(REPLAY_QUEUE, { replayId: row.id }, { transaction });
    return { id: row.id, created: true };
  });
}

const SELECT = `SELECT p.id, p.run_id AS "runId", p.state, p.sampler_version AS "samplerVersion", p.report, p.requested_by_id AS "requestedById",
  u.name AS "requestedByName", p.created_at AS "createdAt", p.finished_at AS "finishedAt"
  FROM provenance.replays p LEFT JOIN users u ON u.id = p.requested_by_id`;

/** One replay by id, or null. */
export async function replayStatus(id: string): Promise<ReplayStatus | null> {
  const rows = (await modelsFor().sequelize.query(`${SELECT} WHERE p.id = $1`, { bind: [id], type: "SELECT" })) as ReplayStatus[];
  return rows[0] ?? null;
}

/** Every replay of run `runId`, newest first. */
export async function replaysOfRun(runId: string): Promise<ReplayStatus[]> {
  await runRow(runId);
  return (await modelsFor().sequelize.query(`${SELECT} WHERE p.run_id = $1 ORDER BY p.created_at DESC`, { bind: [runId], type: "SELECT" })) as ReplayStatus[];
}

/** Mark replay `id` running (the job has picked it up). */
export async function markReplayRunning(id: string): Promise<void> {
  await modelsFor().sequelize.query(`UPDATE provenance.replays SET state = 'running' WHERE id = $1 AND state IN ('queued', 'running')`, { bind: [id] });
}

/** Record the outcome of replay `id` on the run (its replays row) and in the audit log. */
export async function recordReplay(id: string, report: ReplayReport): Promise<void> {
  const { sequelize } = modelsFor();
  const b = report.sampler.replay;
  const version = b ? [b.name, b.version, b.commit ? `(${b.commit})` : null].filter(Boolean).join(" ") : null;
  await sequelize.transaction(async (transaction) => {
    const rows = (await sequelize.query(
      `UPDATE provenance.replays p SET state = $2, report = $3::jsonb, sampler_version = $4, finished_at = now()
         FROM runs r JOIN ensembles e ON e.id = r.ensemble_id WHERE p.id = $1 AND r.id = p.run_id RETURNING p.run_id AS "runId", e.group_id AS "groupId"`,
      { bind: [id, report.outcome, JSON.stringify(report), version], transaction, type: "SELECT" })) as { runId: string; groupId: string }[];
    if (!rows[0]) throw new AppError("not_found", `replay ${id} does not exist`);
    await recordAudit({ actorId: null, ip: null, requestId: `replay:${id}` }, "run.replay.finished", { type: "run", id: rows[0].runId, groupId: rows[0].groupId },
      { replayId: id, outcome: report.outcome, differences: report.differences.slice(0, 20), coreHours: report.coreHours, charged: false }, transaction);
  });
}

/** Record a replay that could not be carried out (cluster refused it, sampler failed, bundle missing). */
export async function failReplay(id: string, error: string, partial: Partial<ReplayReport> = {}): Promise<void> {
  await recordReplay(id, {
    outcome: "failed", differences: [], files: [], skipped: [], sampler: { archived: { name: null, version: null, commit: null }, replay: null },
    cluster: null, host: null, runJson: null, coreHours: 0, charged: false, ...partial, error,
  });
}
