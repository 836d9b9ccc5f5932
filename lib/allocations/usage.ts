import "server-only";
// What an allocation's page and API show: balance, state, caps, the burn chart and rate, usage by
// person and by ensemble. Who sees what (docs/allocations.md): coordinators, admins and PIs of the
// group see every row; researchers and viewers of the group see the group's balance, chart and
// burn rate, but only their own per-person row and their own ensembles.
import { QueryTypes } from "sequelize";
import { AppError } from "@/lib/errors";
import { db, type Allocation } from "@/models";
import type { Identity } from "@/lib/auth/identity";
import { crossGroup } from "@/lib/auth/roles";
import { allocationBalance, type AllocationBalance } from "./balance";
import { burnChart, burnRate, type Burn, type BurnPoint, type DailyCharge } from "./burn";
import { capLimit, capsInForce, describeMeasure, personLimit } from "./caps";
import { allocationContacts, type Contact } from "./contacts";
import { stateHistory, stateOf, type AllocationState, type StateChange } from "./state";

/** One person's figures on an allocation. */
export type PersonRow = { userId: string; name: string; email: string; reserved: number; charged: number; held: number; used: number; cap: number | null; capRule: string | null };
/** One ensemble's figures on an allocation. */
export type EnsembleRow = { ensembleId: string; name: string; owner: string; ownerId: string; state: string; reserved: number; charged: number; held: number };
/** A cap as set, for the history. */
export type CapChange = { at: string; subject: string; person: string | null; rule: string; who: string | null; reason: string | null };
/** A ledger entry as the history shows it. */
export type LedgerRow = { id: string; at: string; kind: string; coreHours: number; note: string | null; who: string | null; ensemble: string | null };

export type AllocationUsage = {
  allocation: { id: string; name: string; groupId: string; group: string; cluster: string | null; periodStart: string; periodEnd: string; state: AllocationState; stateReason: string | null };
  balance: AllocationBalance & { given: number; free: number };
  burn: Burn;
  chart: BurnPoint[];
  caps: { everyone: string | null; ensemble: string | null; ensembleLimit: number | null; persons: { userId: string; rule: string; limit: number }[] };
  byPerson: PersonRow[];
  byEnsemble: EnsembleRow[];
  history: StateChange[];
  ledger: LedgerRow[];
  capChanges: CapChange[];
  contacts: Contact[];
  /** False when per-person and per-ensemble rows are limited to the caller's own. */
  full: boolean;
};

/** May `who` see every person's and ensemble's rows of allocation `a`? */
export function seesAllRows(who: Identity, a: Pick<Allocation, "groupId">): boolean {
  return crossGroup(who.role) || (who.role === "pi" && who.groupIds.includes(a.groupId));
}

const num = (s: string | number | null) => (s === null ? 0 : Number(s));

/** Daily charge sums of an allocation (UTC days). */
export async function dailyCharges(allocationId: string): Promise<DailyCharge[]> {
  const rows = await db().sequelize.query<{ day: string; ch: string }>(
    `SELECT to_char(date_trunc('day', created_at AT TIME ZONE 'UTC'), 'YYYY-MM-DD') AS day, sum(core_hours) AS ch
       FROM ledger_entries WHERE allocation_id = $1 AND kind = 'charge' GROUP BY 1 ORDER BY 1`,
    { type: QueryTypes.SELECT, bind: [allocationId] },
  );
  return rows.map((r) => ({ day: r.day, coreHours: num(r.ch) }));
}

/** The usage of allocation `id` as `who` may see it (the route's guard has checked group scope). */
export async function allocationUsage(who: Identity, id: string, now = new Date()): Promise<AllocationUsage> {
  const m = db();
  const a = await m.Allocation.findByPk(id);
  if (!a) throw new AppError("not_found", "allocation not found");
  const full = seesAllRows(who, a);
  const [balance, state, caps, daily, group, cluster, history, contacts] = await Promise.all([
    allocationBalance(a.id), stateOf(a.id), capsInForce(a), dailyCharges(a.id), m.Group.findByPk(a.groupId), a.clusterId ? m.Cluster.findByPk(a.clusterId) : null,
    stateHistory(a.id), allocationContacts(a.id, a.groupId),
  ]);
  const given = balance.granted + balance.adjusted;
  const people = await m.sequelize.query<{ user_id: string; name: string; email: string; reserved: string; charged: string; released: string }>(
    `SELECT u.id AS user_id, u.name, u.email,
       coalesce(sum(e.core_hours) FILTER (WHERE e.kind = 'reserve'), 0) AS reserved,
       coalesce(sum(e.core_hours) FILTER (WHERE e.kind = 'charge'), 0) AS charged,
       coalesce(sum(e.core_hours) FILTER (WHERE e.kind = 'release'), 0) AS released
     FROM users u
     LEFT JOIN ledger_entries e ON e.user_id = u.id AND e.allocation_id = $1
     WHERE u.id IN (SELECT user_id FROM memberships WHERE group_id = $2)
        OR u.id IN (SELECT user_id FROM ledger_entries WHERE allocation_id = $1 AND kind IN ('reserve', 'charge', 'release'))
     GROUP BY u.id ORDER BY u.name`,
    { type: QueryTypes.SELECT, bind: [a.id, a.groupId] },
  );
  const round4 = (x: number) => Math.round(x * 1e4) / 1e4;
  const byPerson: PersonRow[] = people.map((r) => {
    const [reserved, charged, released] = [r.reserved, r.charged, r.released].map(num);
    const held = round4(reserved - released - charged);
    const cap = personLimit(caps, r.user_id, given);
    return { userId: r.user_id, name: r.name, email: r.email, reserved, charged, held, used: round4(charged + held), cap: cap?.limit ?? null, capRule: cap ? describeMeasure(cap.measure) : null };
  }).filter((r) => full || r.userId === who.userId);
  const ensembles = await m.sequelize.query<{ id: string; name: string; owner: string; owner_id: string; state: string; reserved: string; charged: string; released: string }>(
    `SELECT en.id, en.name, u.name AS owner, en.owner_id, en.state,
       coalesce(sum(e.core_hours) FILTER (WHERE e.kind = 'reserve'), 0) AS reserved,
       coalesce(sum(e.core_hours) FILTER (WHERE e.kind = 'charge'), 0) AS charged,
       coalesce(sum(e.core_hours) FILTER (WHERE e.kind = 'release'), 0) AS released
     FROM ensembles en JOIN users u ON u.id = en.owner_id LEFT JOIN ledger_entries e ON e.ensemble_id = en.id AND e.allocation_id = $1
     WHERE en.allocation_id = $1 ${full ? "" : "AND en.owner_id = $2"}
     GROUP BY en.id, u.name ORDER BY en.created_at DESC LIMIT 500`,
    { type: QueryTypes.SELECT, bind: full ? [a.id] : [a.id, who.userId] },
  );
  const byEnsemble = ensembles.map((r) => {
    const [reserved, charged, released] = [r.reserved, r.charged, r.released].map(num);
    return { ensembleId: r.id, name: r.name, owner: r.owner, ownerId: r.owner_id, state: r.state, reserved, charged, held: round4(reserved - released - charged) };
  });
  const [ledger, capChanges] = full ? await Promise.all([ledgerRows(a.id), capRows(a.id)]) : [[], []];
  const personCaps = [...caps.persons.entries()].map(([userId, measure]) => ({ userId, rule: describeMeasure(measure), limit: capLimit(measure, given) }))
    .filter((c) => full || c.userId === who.userId);
  return {
    allocation: {
      id: a.id, name: a.name, groupId: a.groupId, group: group?.name ?? "", cluster: cluster?.name ?? null,
      periodStart: a.periodStart.toISOString(), periodEnd: a.periodEnd.toISOString(), state: state.state, stateReason: state.reason,
    },
    balance: { ...balance, given: round4(given), free: balance.available },
    burn: burnRate(daily, given, balance.charged, balance.available, a.periodStart, a.periodEnd, now),
    chart: burnChart(daily, given, a.periodStart, a.periodEnd, now),
    caps: {
      everyone: caps.everyone ? describeMeasure(caps.everyone) : null, ensemble: caps.ensemble ? describeMeasure(caps.ensemble) : null,
      ensembleLimit: caps.ensemble ? capLimit(caps.ensemble, given) : null, persons: personCaps,
    },
    byPerson, byEnsemble, history, ledger, capChanges, contacts, full,
  };
}

/** The newest ledger entries other than reservations and settlements (grants, top-ups, adjustments). */
async function ledgerRows(allocationId: string): Promise<LedgerRow[]> {
  const rows = await db().sequelize.query<{ id: string; created_at: Date; kind: string; core_hours: string; note: string | null; who: string | null; ensemble: string | null }>(
    `SELECT e.id::text AS id, e.created_at, e.kind, e.core_hours, e.note, u.name AS who, en.name AS ensemble
       FROM ledger_entries e LEFT JOIN users u ON u.id = e.user_id LEFT JOIN ensembles en ON en.id = e.ensemble_id
      WHERE e.allocation_id = $1 AND e.kind IN ('grant', 'adjust') ORDER BY e.id DESC LIMIT 100`,
    { type: QueryTypes.SELECT, bind: [allocationId] },
  );
  return rows.map((r) => ({ id: r.id, at: new Date(r.created_at).toISOString(), kind: r.kind, coreHours: num(r.core_hours), note: r.note, who: r.who, ensemble: r.ensemble }));
}

/** Every cap row of an allocation, newest first (what was set, for whom, by whom, why). */
async function capRows(allocationId: string): Promise<CapChange[]> {
  const rows = await db().sequelize.query<{ created_at: Date; subject: string; person: string | null; core_hours: string | null; share: string | null; who: string | null; reason: string | null }>(
    `SELECT c.created_at, c.subject, p.name AS person, c.core_hours, c.share, u.name AS who, c.reason
       FROM allocation_caps c LEFT JOIN users p ON p.id = c.user_id LEFT JOIN users u ON u.id = c.actor_id
      WHERE c.allocation_id = $1 ORDER BY c.id DESC LIMIT 100`,
    { type: QueryTypes.SELECT, bind: [allocationId] },
  );
  return rows.map((r) => ({
    at: new Date(r.created_at).toISOString(), subject: r.subject, person: r.person, who: r.who, reason: r.reason,
    rule: r.core_hours !== null ? describeMeasure({ coreHours: Number(r.core_hours) }) : r.share !== null ? describeMeasure({ share: Number(r.share) }) : "lifted",
  }));
}
