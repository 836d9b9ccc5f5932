import "server-only";
import { db } from "@/models";
import { AppError } from "../errors";
import { recordAudit, type AuditSource } from "../audit/record-audit";
import { hashPassword } from "../auth/passwords";
import type { Role } from "../auth/roles";

/** Everyone with their groups, for the People page. */
export async function listPeople() {
  const { User, Membership, Group } = db();
  const [users, memberships, groups] = await Promise.all([
    User.findAll({ order: [["name", "ASC"]] }),
    Membership.findAll(),
    Group.findAll({ order: [["name", "ASC"]] }),
  ]);
  const groupName = new Map(groups.map((g) => [g.id, g.name]));
  return {
    groups: groups.map((g) => ({ id: g.id, name: g.name, slug: g.slug })),
    people: users.map((u) => ({
      id: u.id, email: u.email, name: u.name, role: u.role as Role, active: u.active, lastSignInAt: u.lastSignInAt,
      groups: memberships.filter((m) => m.userId === u.id).map((m) => ({ id: m.groupId, name: groupName.get(m.groupId) ?? "?", isLead: m.isLead })),
    })),
  };
}

export type NewPerson = { email: string; name: string; role: Role; password: string; groupIds?: string[] };

/** Create a person (and memberships) in one transaction, audited. */
export async function createPerson(src: AuditSource, p: NewPerson) {
  const { User, Membership, Group, sequelize } = db();
  const email = p.email.trim().toLowerCase();
  if (await User.findOne({ where: { email } })) throw new AppError("conflict", `someone with the e-mail ${email} already exists`, { issues: [{ path: "/email", message: "is already taken" }] });
  const passwordHash = await hashPassword(p.password);
  return sequelize.transaction(async (transaction) => {
    for (const gid of p.groupIds ?? []) {
      if (!(await Group.findByPk(gid, { transaction }))) throw new AppError("invalid", `group ${gid} does not exist`, { issues: [{ path: "/groupIds", message: `unknown group ${gid}` }] });
    }
    const user = await User.create({ email, name: p.name.trim(), role: p.role, passwordHash }, { transaction });
    for (const groupId of p.groupIds ?? []) await Membership.create({ userId: user.id, groupId, isLead: false }, { transaction });
    await recordAudit(src, "person.create", { type: "user", id: user.id }, { email, role: p.role, groupIds: p.groupIds ?? [] }, transaction);
    return { id: user.id, email, name: user.name, role: p.role };
  });
}

export type PersonChange = { role?: Role; active?: boolean; name?: string };

/** Change a person's role, name or active flag; an admin cannot demote or deactivate themself. */
export async function updatePerson(src: AuditSource, userId: string, change: PersonChange) {
  const { User, sequelize } = db();
  return sequelize.transaction(async (transaction) => {
    const user = await User.findByPk(userId, { transaction, lock: transaction.LOCK.UPDATE });
    if (!user) throw new AppError("not_found", "person not found");
    if (userId === src.actorId && (change.active === false || (change.role && change.role !== user.role))) {
      throw new AppError("conflict", "you cannot change your own role or deactivate yourself; ask another admin");
    }
    const before = { role: user.role, active: user.active, name: user.name };
    await user.update(change, { transaction });
    await recordAudit(src, "person.update", { type: "user", id: userId }, { before, after: change }, transaction);
    return { id: user.id, role: user.role as Role, active: user.active, name: user.name };
  });
}

/** Add to a group (or change lead flag) or remove from it, audited. */
export async function setMembership(src: AuditSource, userId: string, groupId: string, m: { member: boolean; isLead?: boolean }) {
  const { User, Group, Membership, sequelize } = db();
  return sequelize.transaction(async (transaction) => {
    if (!(await User.findByPk(userId, { transaction }))) throw new AppError("not_found", "person not found");
    if (!(await Group.findByPk(groupId, { transaction }))) throw new AppError("not_found", "group not found");
    const existing = await Membership.findOne({ where: { userId, groupId }, transaction });
    if (!m.member) {
      if (existing) await existing.destroy({ transaction });
    } else if (existing) {
      await existing.update({ isLead: m.isLead ?? existing.isLead }, { transaction });
    } else {
      await Membership.create({ userId, groupId, isLead: m.isLead ?? false }, { transaction });
    }
    await recordAudit(src, m.member ? "membership.set" : "membership.remove", { type: "user", id: userId, groupId }, { isLead: m.isLead ?? false }, transaction);
    return { userId, groupId, member: m.member, isLead: m.member ? (m.isLead ?? existing?.isLead ?? false) : false };
  });
}
