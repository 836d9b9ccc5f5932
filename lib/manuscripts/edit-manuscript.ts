import "server-only";
// Drafting a manuscript: create it, add exhibits (the saved view's query behind a figure or table), add collaborators.
import type { AuditSource } from "@/lib/audit/record-audit";
import { recordAudit } from "@/lib/audit/record-audit";
import type { Identity } from "@/lib/auth/identity";
import { modelsFor } from "@/lib/db/models-for";
import { AppError } from "@/lib/errors";
import { validate } from "@/lib/validation";
import type { Exhibit, Manuscript } from "@/models";
import { assertCanEdit, assertDraft, loadManuscript } from "./access";
import { exhibitQuerySchema, type ExhibitQuery } from "./exhibit-query";

/** Create a draft manuscript of `groupId`: a PI leading the group (or an admin). */
export async function createManuscript(audit: AuditSource, who: Identity, input: { groupId: string; title: string; journal?: string | null }): Promise<Manuscript> {
  if (!(who.role === "admin" || (who.role === "pi" && who.leadGroupIds.includes(input.groupId)))) {
    throw new AppError("forbidden", "only a PI leading the group may create its manuscripts");
  }
  if (!input.title?.trim()) throw new AppError("invalid", "title is required", { issues: [{ path: "/title", message: "is required" }] });
  const m = modelsFor();
  return m.sequelize.transaction(async (transaction) => {
    const ms = await m.Manuscript.create({ groupId: input.groupId, title: input.title.trim(), journal: input.journal?.trim() || null, createdById: who.userId }, { transaction });
    await recordAudit(audit, "manuscript.create", { type: "manuscript", id: ms.id, groupId: ms.groupId }, { title: ms.title }, transaction);
    return ms;
  });
}

/** What an exhibit is made of. */
export type ExhibitInput = { label: string; caption?: string | null; kind: "figure" | "table"; query: ExhibitQuery; viewId?: string | null };

/** Add an exhibit to a draft manuscript; its query is checked and stored (with the saved view's id when it came from one). */
export async function addExhibit(audit: AuditSource, who: Identity, manuscriptId: string, input: ExhibitInput): Promise<Exhibit> {
  if (!input.label?.trim()) throw new AppError("invalid", "label is required", { issues: [{ path: "/label", message: "is required" }] });
  if (input.kind !== "figure" && input.kind !== "table") throw new AppError("invalid", "kind must be figure or table", { issues: [{ path: "/kind", message: "must be figure or table" }] });
  const query = validate<ExhibitQuery>(exhibitQuerySchema, structuredClone(input.query ?? {}), "exhibit query");
  const m = modelsFor();
  return m.sequelize.transaction(async (transaction) => {
    const ms = await loadManuscript(manuscriptId, transaction);
    assertDraft(ms);
    await assertCanEdit(who, ms, transaction);
    if (await m.Exhibit.findOne({ where: { manuscriptId, label: input.label.trim() }, transaction })) {
      throw new AppError("conflict", `manuscript already has an exhibit labelled "${input.label.trim()}"`);
    }
    const position = await m.Exhibit.count({ where: { manuscriptId }, transaction });
    const ex = await m.Exhibit.create({
      manuscriptId, label: input.label.trim(), caption: input.caption?.trim() || null, kind: input.kind,
      query: { ...query, ...(input.viewId ? { viewId: input.viewId } : {}) }, position,
    }, { transaction });
    await recordAudit(audit, "manuscript.exhibit.add", { type: "manuscript", id: ms.id, groupId: ms.groupId }, { exhibitId: ex.id, label: ex.label }, transaction);
    return ex;
  });
}

/** Add a researcher of the manuscript's group as a collaborator (creator, leading PI or admin). */
export async function addCollaborator(audit: AuditSource, who: Identity, manuscriptId: string, userId: string): Promise<void> {
  const m = modelsFor();
  await m.sequelize.transaction(async (transaction) => {
    const ms = await loadManuscript(manuscriptId, transaction);
    if (!(who.role === "admin" || ms.createdById === who.userId || (who.role === "pi" && who.leadGroupIds.includes(ms.groupId)))) {
      throw new AppError("forbidden", "only the manuscript's creator or a PI of its group may add collaborators");
    }
    const member = await m.Membership.findOne({ where: { userId, groupId: ms.groupId }, transaction });
    const user = await m.User.findByPk(userId, { transaction });
    if (!member || !user) throw new AppError("invalid", "a collaborator must be a member of the manuscript's group", { issues: [{ path: "/userId", message: "is not a member of the group" }] });
    if (user.role === "viewer") throw new AppError("invalid", "viewers read manuscripts but cannot collaborate on them", { issues: [{ path: "/userId", message: "is a viewer" }] });
    await m.sequelize.query(`INSERT INTO provenance.manuscript_collaborators (manuscript_id, user_id, added_by_id) VALUES ($1, $2, $3) ON CONFLICT DO NOTHING`,
      { bind: [manuscriptId, userId, who.userId], transaction });
    await recordAudit(audit, "manuscript.collaborator.add", { type: "manuscript", id: ms.id, groupId: ms.groupId }, { userId }, transaction);
  });
}
