import "server-only";
// Which group an upload is archived under: the one named (id or slug), else the uploader's only or first group.
import { Op } from "sequelize";
import type { Identity } from "@/lib/auth/identity";
import { AppError } from "@/lib/errors";
import { db } from "@/models";

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

/** The group id for `who`'s upload; a member only (admins may name any group). */
export async function resolveUploadGroup(who: Identity, requested: string | null | undefined): Promise<string> {
  const { Group } = db();
  if (requested) {
    const group = await Group.findOne({ where: UUID.test(requested) ? { [Op.or]: [{ id: requested }, { slug: requested }] } : { slug: requested } });
    if (!group || (who.role !== "admin" && !who.groupIds.includes(group.id))) {
      throw new AppError("invalid", `group ${JSON.stringify(requested)}: you are not a member of such a group`, { field: "group" });
    }
    return group.id;
  }
  if (who.groupIds.length === 0) throw new AppError("invalid", "you belong to no group: name the group to archive the upload under (?group=<slug>)", { field: "group" });
  const groups = await Group.findAll({ where: { id: who.groupIds }, order: [["name", "ASC"]] });
  return groups[0].id;
}
