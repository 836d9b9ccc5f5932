import { AppError } from "../errors";
import { crossGroup } from "./roles";
import type { Identity } from "./identity";

/** The group (and owner) a request acts on; resolved by each policy's `target`. */
export type Target = { groupId: string | null; ownerId?: string | null; type: string; id?: string };

/**
 * The one group-scope rule (DESIGN.md "People and roles"):
 * read — a member of the target's group, or coordinator/admin;
 * act  — the owner, a PI leading the group, or admin (coordinators act only where their role list allows, on
 *        group-less or allocation/cluster targets).
 * A non-member gets 404, so existence does not leak; a member without the right gets 403.
 */
export function checkScope(who: Identity, target: Target, access: "read" | "act"): void {
  if (who.role === "admin") return;
  const member = target.groupId === null || who.groupIds.includes(target.groupId);
  if (!member && !crossGroup(who.role)) throw new AppError("not_found", `${target.type} not found`);
  if (access === "read") return;
  if (target.groupId === null) return;
  if (who.role === "coordinator" && target.ownerId === undefined) return; // allocations, clusters: coordinator's own domain
  if (target.ownerId && target.ownerId === who.userId) return;
  if (who.role === "pi" && who.leadGroupIds.includes(target.groupId)) return;
  throw new AppError("forbidden", `you may not change this ${target.type}`);
}
