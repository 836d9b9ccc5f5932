import "server-only";
// Verify a frozen manuscript: re-hash every archived file beneath it and recompute every frozen estimate,
// as a queue job that records its progress; the report says per exhibit "verified" or exactly what differs.
import fs from "node:fs";
import { recordAudit, type AuditSource } from "@/lib/audit/record-audit";
import type { Identity } from "@/lib/auth/identity";
import { modelsFor } from "@/lib/db/models-for";
import { AppError } from "@/lib/errors";
import { enqueue } from "@/lib/queue/enqueue";
import { gatherEstimates, gatherRuns, type EstimateFacts } from "@/lib/provenance/gather";
import type { ExhibitSnapshot } from "@/lib/provenance/prov-for";
import { hashFile } from "@/lib/storage/hash-file";
import { resolveArchived } from "@/lib/storage/archive-path";
import { assertCanEdit, loadManuscript } from "./access";
import { recomputeEstimate, type EstimateDifference } from "./recompute-estimate";

/** Queue name of the verification job (broker/jobs/verify-manuscript.ts). */
export const VERIFY_QUEUE = "verify-manuscript";

/** A file problem: missing, or its bytes no longer hash to the recorded sha256. */
export type FileProblem = { sha256: string; path: string; runId: string; problem: string };
/** What verification found for one exhibit. */
export type ExhibitReport = { label: string; status: "verified" | "differs"; files: FileProblem[]; estimates: ({ id: string; observable: string; runId: string | null } & EstimateDifference)[] };
/** The whole report. */
export type VerificationReport = { exhibits: ExhibitReport[]; filesChecked: number; estimatesChecked: number };

/** Queue a verification of frozen manuscript `id`; returns the verification's id. */
export async function requestVerification(audit: AuditSource, who: Identity, id: string): Promise<string> {
  const m = modelsFor();
  return m.sequelize.transaction(async (transaction) => {
    const ms = await loadManuscript(id, transaction);
    await assertCanEdit(who, ms, transaction);
    if (ms.state !== "frozen") throw new AppError("conflict", "only a frozen manuscript can be verified");
    const [row] = (await m.sequelize.query(`INSERT INTO provenance.verifications (manuscript_id, requested_by_id) VALUES ($1, $2) RETURNING id`,
      { bind: [id, who.userId], transaction, type: "SELECT" })) as { id: string }[];
    await recordAudit(audit, "manuscript.verify", { type: "manuscript", id, groupId: ms.groupId }, { verificationId: row.id }, transaction);
    await enqueue(VERIFY_QUEUE, { verificationId: row.id }, { transaction });
    return row.id;
  });
}

/** The state, progress and report of a verification. */
export type VerificationStatus = { id: string; manuscriptId: string; state: string; itemsDone: number; itemsTotal: number; report: VerificationReport | null; createdAt: Date; finishedAt: Date | null };

/** Read verification `id` (or the latest of a manuscript with `{ manuscriptId }`). */
export async function verificationStatus(by: { id?: string; manuscriptId?: string }): Promise<VerificationStatus | null> {
  const rows = (await modelsFor().sequelize.query(
    `SELECT id, manuscript_id AS "manuscriptId", state, items_done AS "itemsDone", items_total AS "itemsTotal", report, created_at AS "createdAt", finished_at AS "finishedAt"
       FROM provenance.verifications WHERE ${by.id ? "id = $1" : "manuscript_id = $1"} ORDER BY created_at DESC LIMIT 1`,
    { bind: [by.id ?? by.manuscriptId], type: "SELECT" })) as VerificationStatus[];
  return rows[0] ?? null;
}

async function setProgress(id: string, done: number, total: number, state = "running") {
  await modelsFor().sequelize.query(`UPDATE provenance.verifications SET state = $2, items_done = $3, items_total = $4 WHERE id = $1`, { bind: [id, state, done, total] });
}

/** Do verification `id` (the job's work): files first, then estimates, progress written every few items. */
export async function runVerification(id: string): Promise<VerificationReport> {
  const v = await verificationStatus({ id });
  if (!v) throw new AppError("not_found", `verification ${id} does not exist`);
  const m = modelsFor();
  const exhibits = await m.Exhibit.findAll({ where: { manuscriptId: v.manuscriptId }, order: [["position", "ASC"]] });
  const snaps = exhibits.map((x) => ({ label: x.label, snap: x.snapshot as unknown as ExhibitSnapshot }));
  const files = new Map(snaps.flatMap(({ snap }) => snap.files.map((f) => [f.sha256, f] as const)));
  const estimateIds = [...new Set(snaps.flatMap(({ snap }) => snap.estimates.flatMap((e) => [e.id, ...e.inputs])))];
  const total = files.size + estimateIds.length;
  let done = 0;
  const tick = async () => { if (++done % 10 === 0 || done === total) await setProgress(id, done, total); };
  await setProgress(id, 0, total);

  const storage = new Map(((await m.sequelize.query(`SELECT sha256, storage_path FROM artifacts WHERE sha256 = ANY($1)`, { bind: [[...files.keys()]], type: "SELECT" })) as { sha256: string; storage_path: string }[]).map((r) => [r.sha256, r.storage_path]));
  const badFiles = new Map<string, string>();
  for (const [sha, f] of files) {
    const where = storage.get(sha);
    if (!where) badFiles.set(sha, "no archive record");
    else {
      const full = resolveArchived(where);
      if (!fs.existsSync(full)) badFiles.set(sha, `missing from the archive (${where})`);
      else {
        const d = await hashFile(full);
        if (d.sha256 !== sha) badFiles.set(sha, `content changed: sha256 is now ${d.sha256} (${d.bytes} bytes, recorded ${f.bytes})`);
      }
    }
    await tick();
  }

  const estimates = new Map((await gatherEstimates(estimateIds)).map((e) => [e.id, e]));
  const runs = new Map((await gatherRuns([...new Set(snaps.flatMap(({ snap }) => snap.runs))])).map((r) => [r.id, r]));
  const diffs = new Map<string, EstimateDifference[]>();
  for (const eid of estimateIds) {
    const e = estimates.get(eid);
    if (!e) { diffs.set(eid, [{ field: "id", recorded: eid, recomputed: "estimate row is gone" }]); await tick(); continue; }
    const snapEntry = snaps.flatMap(({ snap }) => snap.estimates).find((s) => s.id === eid);
    const run = e.runId ? runs.get(e.runId) : [...runs.values()].find((r) => r.pointId === e.pointId);
    const inputs = (snapEntry?.inputs ?? []).map((i) => estimates.get(i)).filter((x): x is EstimateFacts => !!x);
    diffs.set(eid, await recomputeEstimate(e, { sampler: run?.sampler.name ?? "", params: run?.params ?? {}, siblings: run?.estimates ?? [], inputs }));
    await tick();
  }

  const report: VerificationReport = { exhibits: [], filesChecked: files.size, estimatesChecked: estimateIds.length };
  for (const { label, snap } of snaps) {
    const fileProblems = snap.files.filter((f) => badFiles.has(f.sha256)).map((f) => ({ sha256: f.sha256, path: f.path, runId: f.runId, problem: badFiles.get(f.sha256)! }));
    const estProblems = snap.estimates.flatMap((s) => [s.id, ...s.inputs]).flatMap((eid) => (diffs.get(eid) ?? []).map((d) => ({ id: eid, observable: estimates.get(eid)?.observable ?? "?", runId: estimates.get(eid)?.runId ?? null, ...d })));
    report.exhibits.push({ label, status: fileProblems.length || estProblems.length ? "differs" : "verified", files: fileProblems, estimates: estProblems });
  }
  const state = report.exhibits.every((x) => x.status === "verified") ? "verified" : "differs";
  await m.sequelize.query(`UPDATE provenance.verifications SET state = $2, items_done = $3, items_total = $3, report = $4, finished_at = now() WHERE id = $1`,
    { bind: [id, state, total, JSON.stringify(report)] });
  return report;
}

/** Mark a verification failed with a reason (the job calls this when the work itself throws). */
export async function failVerification(id: string, reason: string): Promise<void> {
  await modelsFor().sequelize.query(`UPDATE provenance.verifications SET state = 'failed', report = $2, finished_at = now() WHERE id = $1`, { bind: [id, JSON.stringify({ error: reason })] });
}
