import "server-only";
// Who receives which alert. Only active people: a deactivated account's mail goes nowhere useful.
import { Op, type Transaction } from "sequelize";
import { modelsFor } from "@/lib/db/models-for";
import type { UserRole } from "@/models/user";

const unique = (emails: string[]) => [...new Set(emails.map((e) => e.toLowerCase()))].sort();

/** E-mail addresses of every active person holding one of `roles`. */
export async function emailsOfRoles(roles: readonly UserRole[], options: { transaction?: Transaction } = {}): Promise<string[]> {
  const { User } = modelsFor(options.transaction);
  const users = await User.findAll({ where: { role: { [Op.in]: [...roles] }, active: true }, attributes: ["email"], transaction: options.transaction });
  return unique(users.map((u) => u.email));
}

/** E-mail addresses of the active leads (PIs) of a group. */
export async function emailsOfGroupLeads(groupId: string, options: { transaction?: Transaction } = {}): Promise<string[]> {
  const { User, Membership } = modelsFor(options.transaction);
  const leads = await Membership.findAll({ where: { groupId, isLead: true }, attributes: ["userId"], transaction: options.transaction });
  if (leads.length === 0) return [];
  const users = await User.findAll({ where: { id: { [Op.in]: leads.map((m) => m.userId) }, active: true }, attributes: ["email"], transaction: options.transaction });
  return unique(users.map((u) => u.email));
}
