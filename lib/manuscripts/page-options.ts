import "server-only";
// Choices the manuscript page offers an editor: members who may be added as collaborators, and the group's saved views.
import { Op } from "sequelize";
import type { Identity } from "@/lib/auth/identity";
import { modelsFor } from "@/lib/db/models-for";
import { listSavedViews } from "@/lib/explorer/saved-views";

/** Researchers and PIs of the group who are neither the creator nor already collaborators (viewers cannot collaborate). */
export async function collaboratorCandidates(ms: { groupId: string; createdById: string }, current: string[]): Promise<{ id: string; name: string; role: string }[]> {
  const m = modelsFor();
  const members = await m.Membership.findAll({ where: { groupId: ms.groupId }, attributes: ["userId"] });
  const users = await m.User.findAll({
    where: { id: { [Op.in]: members.map((x) => x.userId).filter((u) => u !== ms.createdById && !current.includes(u)) }, role: { [Op.in]: ["researcher", "pi"] } },
    attributes: ["id", "name", "role"], order: [["name", "ASC"]],
  });
  return users.map((u) => ({ id: u.id, name: u.name, role: u.role }));
}

/** Saved explorer views shared with the group, newest first (the exhibit form's choices). */
export async function groupViews(who: Identity, groupId: string): Promise<{ id: string; name: string; queryString: string }[]> {
  const { data } = await listSavedViews(who, { pageSize: 200 });
  return data.filter((v) => v.groupId === groupId).map((v) => ({ id: v.id, name: v.name, queryString: v.queryString }));
}
