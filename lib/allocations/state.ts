import "server-only";
// An allocation's lifecycle state, read from its append-only history (allocation_state_changes):
// the newest row wins, no row means "active". Raw SQL rather than a Sequelize model: the table is
// only ever appended to and read newest-first, which one DISTINCT ON query does for many allocations.
import { QueryTypes, type Transaction } from "sequelize";
import { modelsFor } from "@/lib/db/models-for";

export const ALLOCATION_STATES = ["active", "suspended", "closed"] as const;
export type AllocationState = (typeof ALLOCATION_STATES)[number];

/** The current state with the change that set it (null fields for a never-changed allocation). */
export type StateNow = { state: AllocationState; since: Date | null; reason: string | null; actorId: string | null };

/** One recorded change of state. */
export type StateChange = { id: string; state: AllocationState; reason: string; actorId: string | null; actorName: string | null; at: Date };

type Row = { allocation_id: string; state: AllocationState; reason: string; actor_id: string | null; created_at: Date };

/** Current states of several allocations, keyed by id (allocations without history are "active"). */
export async function statesOf(ids: readonly string[], options: { transaction?: Transaction } = {}): Promise<Map<string, StateNow>> {
  const out = new Map<string, StateNow>(ids.map((id) => [id, { state: "active", since: null, reason: null, actorId: null }]));
  if (ids.length === 0) return out;
  const { sequelize } = modelsFor(options.transaction);
  const rows = await sequelize.query<Row>(
    `SELECT DISTINCT ON (allocation_id) allocation_id, state, reason, actor_id, created_at
       FROM allocation_state_changes WHERE allocation_id = ANY($1::uuid[]) ORDER BY allocation_id, id DESC`,
    { type: QueryTypes.SELECT, bind: [[...new Set(ids)]], transaction: options.transaction },
  );
  for (const r of rows) out.set(r.allocation_id, { state: r.state, since: new Date(r.created_at), reason: r.reason, actorId: r.actor_id });
  return out;
}

/** The current state of one allocation. */
export async function stateOf(allocationId: string, options: { transaction?: Transaction } = {}): Promise<StateNow> {
  return (await statesOf([allocationId], options)).get(allocationId)!;
}

/** Every state change of an allocation, oldest first, with the actor's name. */
export async function stateHistory(allocationId: string, options: { transaction?: Transaction } = {}): Promise<StateChange[]> {
  const { sequelize } = modelsFor(options.transaction);
  const rows = await sequelize.query<{ id: string; state: AllocationState; reason: string; actor_id: string | null; actor_name: string | null; created_at: Date }>(
    `SELECT s.id::text AS id, s.state, s.reason, s.actor_id, u.name AS actor_name, s.created_at
       FROM allocation_state_changes s LEFT JOIN users u ON u.id = s.actor_id WHERE s.allocation_id = $1 ORDER BY s.id`,
    { type: QueryTypes.SELECT, bind: [allocationId], transaction: options.transaction },
  );
  return rows.map((r) => ({ id: r.id, state: r.state, reason: r.reason, actorId: r.actor_id, actorName: r.actor_name, at: new Date(r.created_at) }));
}
