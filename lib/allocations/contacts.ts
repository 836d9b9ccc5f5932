import "server-only";
// Who to ask about an allocation: the coordinators who are members of its group, and the coordinators
// who granted or adjusted it; when there are none (coordinators are usually not group members), every
// active coordinator. Roles are global, so "the group's coordinators" has to be derived like this.
import { QueryTypes, type Transaction } from "sequelize";
import { modelsFor } from "@/lib/db/models-for";

/** A person to ask, by name and e-mail. */
export type Contact = { name: string; email: string };

/** The coordinators to ask about allocation `allocationId` of group `groupId` (see the top of this file). */
export async function allocationContacts(allocationId: string, groupId: string, options: { transaction?: Transaction } = {}): Promise<Contact[]> {
  const { sequelize } = modelsFor(options.transaction);
  const near = await sequelize.query<Contact>(
    `SELECT DISTINCT u.name, u.email FROM users u
      WHERE u.active AND u.role = 'coordinator'
        AND (EXISTS (SELECT 1 FROM memberships m WHERE m.user_id = u.id AND m.group_id = $2)
             OR EXISTS (SELECT 1 FROM ledger_entries e WHERE e.allocation_id = $1 AND e.user_id = u.id AND e.kind IN ('grant', 'adjust')))
      ORDER BY u.name`,
    { type: QueryTypes.SELECT, bind: [allocationId, groupId], transaction: options.transaction },
  );
  if (near.length > 0) return near;
  return sequelize.query<Contact>(
    "SELECT name, email FROM users WHERE active AND role = 'coordinator' ORDER BY name",
    { type: QueryTypes.SELECT, transaction: options.transaction },
  );
}

/** "Ask Tobiah Kestrane <coordinator@…>" or a fallback when nobody holds the role. */
export function askLine(contacts: Contact[]): string {
  if (contacts.length === 0) return "Ask an admin: no coordinator is registered.";
  return `Ask ${contacts.map((c) => `${c.name} <${c.email}>`).join(" or ")}.`;
}
