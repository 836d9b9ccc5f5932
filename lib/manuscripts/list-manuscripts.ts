import "server-only";
// Reading manuscripts for pages and routes: the list a person may see, and one manuscript with its exhibits.
import { Op } from "sequelize";
import type { Identity } from "@/lib/auth/identity";
import { crossGroup } from "@/lib/auth/roles";
import { modelsFor } from "@/lib/db/models-for";
import type { ExhibitSnapshot } from "@/lib/provenance/prov-for";
import { collaboratorIds, loadManuscript } from "./access";
import { exhibitPreview, type ExhibitPreview } from "./exhibit-preview";
import { manuscriptHistory } from "./manuscript-history";
import { verificationStatus } from "./verify-manuscript";

/** One line of the manuscripts list. */
export type ManuscriptRow = { id: string; title: string; journal: string | null; state: string; groupId: string; groupName: string; exhibits: number; frozenAt: Date | null; createdAt: Date; mayEdit: boolean };

/** Manuscripts of the caller's groups (every group for coordinators and admins), newest first. */
export async function listManuscripts(who: Identity): Promise<ManuscriptRow[]> {
  const m = modelsFor();
  const where = crossGroup(who.role) ? {} : { groupId: { [Op.in]: who.groupIds } };
  const rows = await m.Manuscript.findAll({ where, order: [["createdAt", "DESC"]], include: [{ model: m.Exhibit, as: "exhibits", attributes: ["id"] }] });
  const groups = new Map((await m.Group.findAll({ where: { id: [...new Set(rows.map((r) => r.groupId))] }, attributes: ["id", "name"] })).map((g) => [g.id, g.name]));
  const mine = new Set(((await m.sequelize.query(`SELECT manuscript_id FROM provenance.manuscript_collaborators WHERE user_id = $1`,
    { bind: [who.userId], type: "SELECT" })) as { manuscript_id: string }[]).map((r) => r.manuscript_id));
  // the same rule as assertCanEdit, so the explorer offers only manuscripts the server will accept an exhibit for
  const mayEdit = (r: { id: string; groupId: string; createdById: string; state: string }) => r.state === "draft" &&
    (who.role === "admin" || (who.role === "pi" && who.leadGroupIds.includes(r.groupId)) || r.createdById === who.userId || (who.role !== "viewer" && mine.has(r.id)));
  return rows.map((r) => ({ id: r.id, title: r.title, journal: r.journal, state: r.state, groupId: r.groupId, groupName: groups.get(r.groupId) ?? "", exhibits: r.exhibits?.length ?? 0, frozenAt: r.frozenAt, createdAt: r.createdAt, mayEdit: mayEdit(r) }));
}

/** One exhibit as pages and the API show it. */
export type ExhibitView = { id: string; label: string; caption: string | null; kind: string; position: number; query: Record<string, unknown>; snapshotHash: string | null; snapshot: ExhibitSnapshot | null; preview: ExhibitPreview };

/** A manuscript with exhibits (snapshots included once frozen), collaborators, what the caller may do, and its latest verification. */
export async function manuscriptDetail(who: Identity, id: string) {
  const m = modelsFor();
  const ms = await loadManuscript(id);
  const exhibits = await m.Exhibit.findAll({ where: { manuscriptId: id }, order: [["position", "ASC"]] });
  const collaborators = await collaboratorIds(id);
  const people = await m.User.findAll({ where: { id: [ms.createdById, ...(ms.frozenById ? [ms.frozenById] : []), ...collaborators] }, attributes: ["id", "name"] });
  const name = (uid: string | null) => (uid ? people.find((p) => p.id === uid)?.name ?? uid : null);
  const leads = who.role === "admin" || (who.role === "pi" && who.leadGroupIds.includes(ms.groupId));
  const edits = leads || ms.createdById === who.userId || (who.role !== "viewer" && collaborators.includes(who.userId));
  return {
    id: ms.id, title: ms.title, journal: ms.journal, state: ms.state, groupId: ms.groupId, createdAt: ms.createdAt,
    createdBy: { id: ms.createdById, name: name(ms.createdById) }, frozenAt: ms.frozenAt, frozenBy: ms.frozenById ? { id: ms.frozenById, name: name(ms.frozenById) } : null,
    collaborators: collaborators.map((c) => ({ id: c, name: name(c) })),
    exhibits: await Promise.all(exhibits.map(async (x): Promise<ExhibitView> => {
      const snapshot = x.snapshot as unknown as ExhibitSnapshot | null;
      return { id: x.id, label: x.label, caption: x.caption, kind: x.kind, position: x.position, query: x.query, snapshotHash: x.snapshotHash, snapshot, preview: await exhibitPreview(ms.groupId, { query: x.query, snapshot }) };
    })),
    may: { edit: edits && ms.state === "draft", freeze: leads && ms.state === "draft", unfreeze: who.role === "pi" && who.leadGroupIds.includes(ms.groupId) && ms.state === "frozen", verify: edits && ms.state === "frozen" },
    latestVerification: await verificationStatus({ manuscriptId: id }),
    history: await manuscriptHistory(id),
  };
}
/** What {@link manuscriptDetail} returns. */
export type ManuscriptDetail = Awaited<ReturnType<typeof manuscriptDetail>>;
