import "server-only";
// The Allocations page's list: every allocation in the viewer's group scope with state and balance.
import { db } from "@/models";
import type { Identity } from "@/lib/auth/identity";
import { visibleGroupIds } from "@/lib/auth/visible-groups";
import { balancesForAllocations } from "./balance";
import { statesOf, type AllocationState } from "./state";

/** One row of the list. */
export type AllocationListRow = {
  id: string; name: string; group: string; cluster: string | null; periodStart: string; periodEnd: string; state: AllocationState;
  given: number; charged: number; held: number; available: number;
};

/** Allocations `who` may see, newest period first. */
export async function listAllocations(who: Identity): Promise<AllocationListRow[]> {
  const m = db();
  const groups = visibleGroupIds(who);
  const rows = await m.Allocation.findAll({ where: groups === null ? {} : { groupId: groups }, order: [["periodEnd", "DESC"], ["name", "ASC"]] });
  const ids = rows.map((a) => a.id);
  const [balances, states, groupRows, clusters] = await Promise.all([
    balancesForAllocations(ids), statesOf(ids),
    m.Group.findAll({ where: { id: [...new Set(rows.map((a) => a.groupId))] }, attributes: ["id", "name"] }),
    m.Cluster.findAll({ attributes: ["id", "name"] }),
  ]);
  const groupName = new Map(groupRows.map((g) => [g.id, g.name]));
  const clusterName = new Map(clusters.map((c) => [c.id, c.name]));
  return rows.map((a) => {
    const b = balances.get(a.id)!;
    return {
      id: a.id, name: a.name, group: groupName.get(a.groupId) ?? "", cluster: a.clusterId ? clusterName.get(a.clusterId) ?? null : null,
      periodStart: a.periodStart.toISOString(), periodEnd: a.periodEnd.toISOString(), state: states.get(a.id)!.state,
      given: Math.round((b.granted + b.adjusted) * 1e4) / 1e4, charged: b.charged, held: b.held, available: b.available,
    };
  });
}
