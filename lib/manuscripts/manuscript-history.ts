import "server-only";
// A manuscript's history for its page: every audited change (created, exhibits and collaborators added, frozen,
// unfrozen with its reason, verification requested) and every verification's outcome, oldest first.
import { modelsFor } from "@/lib/db/models-for";

/** One line of the history. */
export type HistoryEntry = { at: Date; action: string; who: string | null; detail: Record<string, unknown> };

/** The history of manuscript `id`. */
export async function manuscriptHistory(id: string): Promise<HistoryEntry[]> {
  const m = modelsFor();
  const rows = (await m.sequelize.query(
    `SELECT a.created_at AS at, a.action, u.name AS who, a.detail FROM audit_entries a LEFT JOIN users u ON u.id = a.actor_id
      WHERE a.target_type = 'manuscript' AND a.target_id = $1::text
     UNION ALL
     SELECT v.finished_at, 'manuscript.verified', NULL, jsonb_build_object('verificationId', v.id, 'state', v.state)
       FROM provenance.verifications v WHERE v.manuscript_id = $1::uuid AND v.finished_at IS NOT NULL
     ORDER BY at ASC`, { bind: [id], type: "SELECT" })) as HistoryEntry[];
  // an added editor is named, not shown as an id
  const ids = [...new Set(rows.map((r) => r.detail?.userId).filter((u): u is string => typeof u === "string"))];
  const names = new Map(ids.length ? (await m.User.findAll({ where: { id: ids }, attributes: ["id", "name"] })).map((u) => [u.id, u.name]) : []);
  return rows.map((r) => ({ ...r, at: new Date(r.at), detail: typeof r.detail?.userId === "string" ? { ...r.detail, userName: names.get(r.detail.userId as string) ?? null } : r.detail }));
}
