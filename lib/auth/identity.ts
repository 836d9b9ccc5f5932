import "server-only";
import { db } from "@/models";
import type { Role } from "./roles";

/** Who is calling: the person, their role and the groups they belong to and lead. */
export type Identity = {
  userId: string;
  email: string;
  name: string;
  role: Role;
  groupIds: string[];
  leadGroupIds: string[];
  via: "session" | "token";
  tokenId?: string;
};

/** Load an active person with their memberships; null when missing or deactivated. */
export async function loadIdentity(userId: string, via: Identity["via"], tokenId?: string): Promise<Identity | null> {
  const { User, Membership } = db();
  const user = await User.findByPk(userId);
  if (!user || !user.active) return null;
  const memberships = await Membership.findAll({ where: { userId } });
  return {
    userId: user.id,
    email: user.email,
    name: user.name,
    role: user.role as Role,
    groupIds: memberships.map((m) => m.groupId),
    leadGroupIds: memberships.filter((m) => m.isLead).map((m) => m.groupId),
    via,
    tokenId,
  };
}
