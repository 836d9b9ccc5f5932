import "server-only";
import { db } from "@/models";
import { visibleGroupIds } from "../auth/visible-groups";
import type { Identity } from "../auth/identity";

/** Groups the caller may see, with member counts. */
export async function listGroups(who: Identity) {
  const { Group, Membership } = db();
  const ids = visibleGroupIds(who);
  const groups = await Group.findAll({ where: ids === null ? {} : { id: ids }, order: [["name", "ASC"]] });
  const members = await Membership.findAll({ where: { groupId: groups.map((g) => g.id) } });
  return groups.map((g) => ({ id: g.id, slug: g.slug, name: g.name, institute: g.institute, members: members.filter((m) => m.groupId === g.id).length, youLead: who.leadGroupIds.includes(g.id) }));
}
