import "server-only";
// An allocation's balance, always computed from its ledger entries (never stored, so it cannot drift).
//
// Sign convention. Every entry's coreHours is >= 0 except 'adjust', which may take either sign;
// the kind says which way the hours move:
//   grant    +  hours given to the allocation by a coordinator
//   adjust   ±  a correction (negative takes hours away)
//   reserve  -  hours set aside for submitted runs (at submission, under a row lock)
//   charge      part of an outstanding reservation turned into actual spend; it does not change
//               `available`, since the hours already left it when they were reserved
//   release  +  the unspent rest of a reservation, returned
// From which:
//   available = Σgrant + Σadjust − Σreserve + Σrelease   (what a new submission may reserve)
//   charged   = Σcharge                                   (what was really used)
//   held      = Σreserve − Σrelease − Σcharge             (reserved, not yet settled)
// Once every run is settled held is 0, i.e. Σreserve = Σcharge + Σrelease.
import { QueryTypes, type Transaction } from "sequelize";
import { AppError } from "@/lib/errors";
import { modelsFor } from "@/lib/db/models-for";

/** Core-hour figures of one allocation, as numbers. */
export type AllocationBalance = {
  granted: number;
  adjusted: number;
  reserved: number;
  charged: number;
  released: number;
  held: number;
  available: number;
};

type Row = { allocation_id: string; granted: string; adjusted: string; reserved: string; charged: string; released: string };

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

function toBalance(row: Row): AllocationBalance {
  // Sums of numeric(16,4) come back as exact decimal strings; core-hour totals fit a double easily.
  const [granted, adjusted, reserved, charged, released] = [row.granted, row.adjusted, row.reserved, row.charged, row.released].map(Number);
  // Rounded to the column's 4 decimals so that e.g. 0.1 + 0.2 reads as 0.3, as in the database.
  const round = (x: number) => Math.round(x * 1e4) / 1e4;
  return {
    granted, adjusted, reserved, charged, released,
    held: round(reserved - released - charged),
    available: round(granted + adjusted - reserved + released),
  };
}

export type BalanceOptions = {
  transaction?: Transaction;
  /**
   * Lock the allocation rows (SELECT … FOR UPDATE, in id order) before summing, so that no other
   * transaction can reserve on them until this one ends: check-then-reserve cannot overspend.
   * Needs a transaction.
   */
  lock?: boolean;
};

/** Balances of several allocations in one aggregate query, keyed by allocation id; unknown ids are an error. */
export async function balancesForAllocations(
  ids: readonly string[],
  options: BalanceOptions = {},
): Promise<Map<string, AllocationBalance>> {
  const result = new Map<string, AllocationBalance>();
  if (ids.length === 0) return result;
  const bad = ids.find((id) => typeof id !== "string" || !UUID.test(id));
  if (bad !== undefined) throw new AppError("bad_request", `allocation id ${JSON.stringify(bad)} is not a uuid`);
  if (options.lock && !options.transaction) throw new AppError("internal", "balancesForAllocations: lock needs a transaction");
  const { sequelize } = modelsFor(options.transaction);
  if (options.lock) {
    await sequelize.query("SELECT id FROM allocations WHERE id = ANY($1::uuid[]) ORDER BY id FOR UPDATE",
      { type: QueryTypes.SELECT, bind: [[...new Set(ids)]], transaction: options.transaction });
  }
  const rows = await sequelize.query<Row>(
    "SELECT * FROM allocation_balances WHERE allocation_id = ANY($1::uuid[])",
    { type: QueryTypes.SELECT, bind: [[...new Set(ids)]], transaction: options.transaction },
  );
  for (const row of rows) result.set(row.allocation_id, toBalance(row));
  const missing = ids.find((id) => !result.has(id));
  if (missing !== undefined) throw new AppError("not_found", `allocation ${missing} does not exist`);
  return result;
}

/** The balance of one allocation (see the sign convention at the top of this file). */
export async function allocationBalance(allocationId: string, options: BalanceOptions = {}): Promise<AllocationBalance> {
  const balances = await balancesForAllocations([allocationId], options);
  return balances.get(allocationId)!;
}

/** One person's use of an allocation: what they hold in reservations and what was charged to them. */
export type PersonUsage = { reserved: number; charged: number; released: number; held: number; used: number };

/**
 * Per-person figures of one allocation, keyed by userId (entries without a user are left out),
 * for per-person caps: `used` = charged + held, i.e. spent plus still set aside.
 */
export async function usageByPerson(allocationId: string, options: { transaction?: Transaction } = {}): Promise<Map<string, PersonUsage>> {
  if (typeof allocationId !== "string" || !UUID.test(allocationId)) throw new AppError("bad_request", `allocation id ${JSON.stringify(allocationId)} is not a uuid`);
  const { sequelize } = modelsFor(options.transaction);
  const rows = await sequelize.query<{ user_id: string; reserved: string; charged: string; released: string }>(
    `SELECT user_id,
       coalesce(sum(core_hours) FILTER (WHERE kind = 'reserve'), 0) AS reserved,
       coalesce(sum(core_hours) FILTER (WHERE kind = 'charge'), 0) AS charged,
       coalesce(sum(core_hours) FILTER (WHERE kind = 'release'), 0) AS released
     FROM ledger_entries WHERE allocation_id = $1 AND user_id IS NOT NULL GROUP BY user_id`,
    { type: QueryTypes.SELECT, bind: [allocationId], transaction: options.transaction },
  );
  const round = (x: number) => Math.round(x * 1e4) / 1e4;
  return new Map(rows.map((r) => {
    const [reserved, charged, released] = [r.reserved, r.charged, r.released].map(Number);
    const held = round(reserved - released - charged);
    return [r.user_id, { reserved, charged, released, held, used: round(charged + held) }];
  }));
}
