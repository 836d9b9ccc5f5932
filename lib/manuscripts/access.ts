import "server-only";
// Who may do what to a manuscript: read by group members; edit by its creator, its collaborators,
// a PI leading its group or an admin; freeze and unfreeze by a leading PI (or an admin).
import type { Transaction } from "sequelize";
import type { Identity } from "@/lib/auth/identity";
import type { Target } from "@/lib/auth/scope";
import { modelsFor } from "@/lib/db/models-for";
import { AppError } from "@/lib/errors";
import type { Manuscript } from "@/models";

/** The guard's target for a manuscript id (null when there is none). */
export async function manuscriptTarget(id: string): Promise<Target | null> {
  if (!/^[0-9a-f-]{36}$/i.test(id)) return null;
  const ms = await modelsFor().Manuscript.findByPk(id, { attributes: ["id", "groupId", "createdById"] });
  return ms ? { type: "manuscript", id: ms.id, groupId: ms.groupId, ownerId: ms.createdById } : null;
}

/** The manuscript, or not_found; a row lock when a transaction is given. */
export async function loadManuscript(id: string, transaction?: Transaction): Promise<Manuscript> {
  const m = modelsFor(transaction);
  const ms = await m.Manuscript.findByPk(id, { transaction, lock: transaction ? transaction.LOCK.UPDATE : undefined });
  if (!ms) throw new AppError("not_found", `manuscript ${id} does not exist`);
  return ms;
}

/** Ids of the people the manuscript's creator added as collaborators. */
export async function collaboratorIds(manuscriptId: string, transaction?: Transaction): Promise<string[]> {
  const rows = (await modelsFor(transaction).sequelize.query(`SELECT user_id FROM provenance.manuscript_collaborators WHERE manuscript_id = $1`,
    { bind: [manuscriptId], transaction, type: "SELECT" })) as { user_id: string }[];
  return rows.map((r) => r.user_id);
}

const leads = (who: Identity, ms: Manuscript) => who.role === "admin" || (who.role === "pi" && who.leadGroupIds.includes(ms.groupId));

/** Refuse unless `who` may edit the manuscript's draft (exhibits, collaborators). */
export async function assertCanEdit(who: Identity, ms: Manuscript, transaction?: Transaction): Promise<void> {
  if (leads(who, ms) || ms.createdById === who.userId) return;
  if (who.role !== "viewer" && (await collaboratorIds(ms.id, transaction)).includes(who.userId)) return;
  throw new AppError("forbidden", "only the manuscript's creator, its collaborators or a PI of its group may change it");
}

/** Refuse unless `who` is a PI leading the manuscript's group (or an admin). */
export function assertLeadPi(who: Identity, ms: Manuscript, what: string): void {
  if (!leads(who, ms)) throw new AppError("forbidden", `only a PI leading the manuscript's group may ${what}`);
}

/** Refuse edits of a frozen manuscript (the database refuses them too). */
export function assertDraft(ms: Manuscript): void {
  if (ms.state === "frozen") throw new AppError("conflict", `manuscript "${ms.title}" is frozen; a PI must unfreeze it first`);
}
