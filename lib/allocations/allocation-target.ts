import "server-only";
// Group-scope target of the allocation routes and actions: the allocation's group (no owner, so a
// coordinator may act on it where the role list allows: lib/auth/scope.ts).
import { db } from "@/models";
import type { Target } from "@/lib/auth/scope";

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

/** The scope target of allocation `id`, or null when there is none. */
export async function allocationTarget(id: string): Promise<Target | null> {
  if (typeof id !== "string" || !UUID.test(id)) return null;
  const a = await db().Allocation.findByPk(id, { attributes: ["id", "groupId"] });
  return a ? { type: "allocation", id: a.id, groupId: a.groupId } : null;
}
