import "server-only";
// Freeze: snapshot each exhibit's exact estimates and the hashes of every archived file beneath them, and
// list every estimate, run and file in provenance.frozen_items so the database refuses changes to them.
// Unfreeze: only a PI leading the group, with a reason, recorded in the audit log.
import crypto from "node:crypto";
import type { Transaction } from "sequelize";
import { recordAudit, type AuditSource } from "@/lib/audit/record-audit";
import type { Identity } from "@/lib/auth/identity";
import { modelsFor } from "@/lib/db/models-for";
import { AppError } from "@/lib/errors";
import { gatherEstimates, type EstimateFacts } from "@/lib/provenance/gather";
import type { ExhibitSnapshot } from "@/lib/provenance/prov-for";
import { canonicalJson } from "@/lib/spec/spec-hash";
import type { Manuscript } from "@/models";
import { assertDraft, assertLeadPi, loadManuscript } from "./access";
import { selectExhibitEstimates, type ExhibitQuery } from "./exhibit-query";

type Q = <T>(sql: string, bind: unknown[]) => Promise<T[]>;
const querier = (transaction: Transaction): Q => (sql, bind) => modelsFor(transaction).sequelize.query(sql, { bind, transaction, type: "SELECT" }) as never;

/** The current run estimates a point estimate combines (at freeze time these are its inputs). */
async function inputsOf(q: Q, points: EstimateFacts[]): Promise<Map<string, { id: string; runId: string }[]>> {
  const out = new Map<string, { id: string; runId: string }[]>();
  if (points.length === 0) return out;
  const rows = await q<{ id: string; run_id: string; point_id: string; observable: string }>(
    `SELECT id, run_id, point_id, observable FROM estimates WHERE scope = 'run' AND is_current AND point_id = ANY($1)`, [points.map((p) => p.pointId)]);
  for (const p of points) out.set(p.id, rows.filter((r) => r.point_id === p.pointId && r.observable === p.observable).map((r) => ({ id: r.id, runId: r.run_id })));
  return out;
}

/** Build one exhibit's snapshot from the estimates its query selects now. */
export async function snapshotExhibit(groupId: string, label: string, query: ExhibitQuery, transaction: Transaction): Promise<ExhibitSnapshot> {
  const q = querier(transaction);
  const ids = await selectExhibitEstimates(groupId, query, transaction);
  if (ids.length === 0) throw new AppError("conflict", `exhibit "${label}" selects no estimates; change its view before freezing`);
  const estimates = await gatherEstimates(ids, transaction);
  const inputs = await inputsOf(q, estimates.filter((e) => e.scope === "point"));
  const runIds = [...new Set(estimates.flatMap((e) => (e.scope === "run" ? [e.runId!] : (inputs.get(e.id) ?? []).map((i) => i.runId))))].sort();
  const files = await q<{ sha256: string; path: string; runId: string; bytes: number }>(
    `SELECT a.sha256, ra.path, ra.run_id AS "runId", a.bytes::float8 AS bytes FROM run_artifacts ra JOIN artifacts a ON a.sha256 = ra.artifact_sha256
      WHERE ra.run_id = ANY($1) ORDER BY ra.run_id, ra.path`, [runIds]);
  const params = await q<{ id: string; params: Record<string, unknown> }>(`SELECT id, params FROM estimates WHERE id = ANY($1)`, [ids]);
  const paramsOf = new Map(params.map((p) => [p.id, p.params]));
  return {
    estimates: estimates.map((e) => ({
      id: e.id, scope: e.scope, observable: e.observable, mean: e.mean, error: e.error, tauInt: e.tauInt, analysisVersion: e.analysisVersion, method: e.method,
      thermCut: e.thermCut, window: e.window, version: e.version, runId: e.runId, pointId: e.pointId, params: paramsOf.get(e.id) ?? {},
      inputs: e.scope === "point" ? (inputs.get(e.id) ?? []).map((i) => i.id) : [],
    })),
    runs: runIds,
    files,
  };
}

/** sha256 of a snapshot's canonical JSON. */
export const snapshotHash = (s: ExhibitSnapshot): string => crypto.createHash("sha256").update(canonicalJson(s)).digest("hex");

/** Freeze manuscript `id` (a PI leading its group, or an admin). */
export async function freezeManuscript(audit: AuditSource, who: Identity, id: string): Promise<Manuscript> {
  const m = modelsFor();
  return m.sequelize.transaction(async (transaction) => {
    const ms = await loadManuscript(id, transaction);
    assertLeadPi(who, ms, "freeze it");
    assertDraft(ms);
    const exhibits = await m.Exhibit.findAll({ where: { manuscriptId: id }, order: [["position", "ASC"]], transaction });
    if (exhibits.length === 0) throw new AppError("conflict", "a manuscript needs at least one exhibit before it can be frozen");
    const items: { kind: string; key: string }[] = [];
    const hashes: Record<string, string> = {};
    for (const ex of exhibits) {
      const snap = await snapshotExhibit(ms.groupId, ex.label, ex.query as ExhibitQuery, transaction);
      items.push(...snap.estimates.flatMap((e) => [{ kind: "estimate", key: e.id }, ...e.inputs.map((i) => ({ kind: "estimate", key: i }))]));
      items.push(...snap.runs.map((r) => ({ kind: "run", key: r })), ...snap.files.map((f) => ({ kind: "artifact", key: f.sha256 })));
      const hash = snapshotHash(snap);
      hashes[ex.label] = hash;
      await ex.update({ snapshot: snap as unknown as Record<string, unknown>, snapshotHash: hash }, { transaction });
    }
    await m.sequelize.query(
      `INSERT INTO provenance.frozen_items (manuscript_id, item_kind, item_key) SELECT $1, k, v FROM unnest($2::text[], $3::text[]) AS t (k, v) ON CONFLICT DO NOTHING`,
      { bind: [id, items.map((i) => i.kind), items.map((i) => i.key)], transaction });
    await ms.update({ state: "frozen", frozenAt: new Date(), frozenById: who.userId }, { transaction });
    await recordAudit(audit, "manuscript.freeze", { type: "manuscript", id, groupId: ms.groupId }, { snapshotHashes: hashes, items: items.length }, transaction);
    return ms;
  });
}

/** Unfreeze manuscript `id`: only a PI leading its group, with a reason; the released snapshot hashes go to the audit log. */
export async function unfreezeManuscript(audit: AuditSource, who: Identity, id: string, reason: string): Promise<Manuscript> {
  if (!reason?.trim()) throw new AppError("invalid", "say why the manuscript is unfrozen", { issues: [{ path: "/reason", message: "is required" }] });
  const m = modelsFor();
  return m.sequelize.transaction(async (transaction) => {
    const ms = await loadManuscript(id, transaction);
    if (!(who.role === "pi" && who.leadGroupIds.includes(ms.groupId))) throw new AppError("forbidden", "only a PI leading the manuscript's group may unfreeze it");
    if (ms.state !== "frozen") throw new AppError("conflict", "the manuscript is not frozen");
    const exhibits = await m.Exhibit.findAll({ where: { manuscriptId: id }, transaction });
    const hashes = Object.fromEntries(exhibits.map((x) => [x.label, x.snapshotHash]));
    // Order matters to the triggers: the manuscript leaves 'frozen' first, then its items and snapshots may go.
    await ms.update({ state: "draft", frozenAt: null, frozenById: null }, { transaction });
    await m.sequelize.query(`DELETE FROM provenance.frozen_items WHERE manuscript_id = $1`, { bind: [id], transaction });
    for (const x of exhibits) await x.update({ snapshot: null, snapshotHash: null }, { transaction });
    await recordAudit(audit, "manuscript.unfreeze", { type: "manuscript", id, groupId: ms.groupId }, { reason: reason.trim(), releasedSnapshotHashes: hashes }, transaction);
    return ms;
  });
}

/** Whether any frozen manuscript rests on run `runId` (for callers that refuse re-analysis up front). */
export async function isRunFrozen(runId: string, transaction?: Transaction): Promise<boolean> {
  const rows = (await modelsFor(transaction).sequelize.query(`SELECT provenance.is_frozen('run', $1) AS f`, { bind: [runId], transaction, type: "SELECT" })) as { f: boolean }[];
  return rows[0].f;
}
