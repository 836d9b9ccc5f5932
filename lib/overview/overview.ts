import "server-only";
import { QueryTypes } from "sequelize";
import { db } from "@/models";
import { balancesForAllocations } from "../allocations/balance";
import { visibleGroupIds } from "../auth/visible-groups";
import type { Identity } from "../auth/identity";

export const RUN_STATES = ["queued", "dispatched", "running", "collecting", "done", "failed", "cancelled"] as const;

/** The dashboard's figures, all read from the database within the caller's group scope. */
export async function overviewFor(who: Identity) {
  const { sequelize, Allocation, Group } = db();
  const groups = visibleGroupIds(who);
  const scoped = groups === null ? {} : { groupId: groups };
  const [allocations, groupRows] = await Promise.all([
    Allocation.findAll({ where: scoped, order: [["periodEnd", "ASC"]] }),
    Group.findAll({ where: groups === null ? {} : { id: groups } }),
  ]);
  const groupName = new Map(groupRows.map((g) => [g.id, g.name]));
  const balances = await balancesForAllocations(allocations.map((a) => a.id));
  const groupFilter = groups === null ? "" : "where e.group_id = any($1::uuid[])";
  const bind = groups === null ? [] : [groups];
  const runCounts = await sequelize.query<{ state: string; n: string }>(
    `select r.state, count(*) as n from runs r join ensembles e on e.id = r.ensemble_id ${groupFilter} group by r.state`,
    { type: QueryTypes.SELECT, bind },
  );
  const runEvents = await sequelize.query<{ at: Date; run_id: string; from_state: string | null; to_state: string; cause: string; ensemble: string }>(
    `select ev.created_at as at, ev.run_id, ev.from_state, ev.to_state, ev.cause, e.name as ensemble
       from run_events ev join runs r on r.id = ev.run_id join ensembles e on e.id = r.ensemble_id ${groupFilter}
      order by ev.created_at desc limit 10`,
    { type: QueryTypes.SELECT, bind },
  );
  const auditFilter = groups === null ? "" : "where a.group_id = any($1::uuid[]) or a.actor_id = $2";
  const audits = await sequelize.query<{ at: Date; action: string; target_type: string; actor: string | null }>(
    `select a.created_at as at, a.action, a.target_type, u.name as actor
       from audit_entries a left join users u on u.id = a.actor_id ${auditFilter}
      order by a.created_at desc limit 10`,
    { type: QueryTypes.SELECT, bind: groups === null ? [] : [groups, who.userId] },
  );
  const byState = Object.fromEntries(RUN_STATES.map((s) => [s, 0])) as Record<string, number>;
  for (const r of runCounts) byState[r.state] = Number(r.n);
  return {
    allocations: allocations.map((a) => ({
      id: a.id, name: a.name, group: groupName.get(a.groupId) ?? "", periodStart: a.periodStart, periodEnd: a.periodEnd,
      ...balances.get(a.id)!,
    })),
    runsByState: byState,
    activity: [
      ...runEvents.map((e) => ({ at: new Date(e.at), kind: "run" as const, text: `${e.ensemble}: run ${e.run_id.slice(0, 8)} ${e.from_state ?? "new"} → ${e.to_state}`, detail: e.cause })),
      ...audits.map((a) => ({ at: new Date(a.at), kind: "audit" as const, text: `${a.actor ?? "system"}: ${a.action}`, detail: a.target_type })),
    ].sort((x, y) => y.at.getTime() - x.at.getTime()).slice(0, 12),
  };
}
