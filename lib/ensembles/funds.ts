import "server-only";
// Can an allocation (and the person's cap on it) cover a reservation? Shared by preview, submit and resubmit.
import type { Transaction } from "sequelize";
import { AppError } from "@/lib/errors";
import { allocationBalance, usageByPerson } from "@/lib/allocations/balance";
import type { Allocation } from "@/models";

/** The figures behind a funds decision, in core-hours. */
export type Funds = {
  needed: number;
  available: number;
  /** null when the allocation sets no per-person cap. */
  cap: { limit: number; used: number; remaining: number } | null;
  problems: { code: "insufficient_allocation"; message: string; needed: number; available: number }[];
};

const fmt = (x: number) => x.toLocaleString("en", { maximumFractionDigits: 4 });

/**
 * The allocation's available balance and the person's cap use against `needed`. With lock: true
 * (inside a transaction) the allocation row is locked first, so the answer holds until commit.
 */
export async function checkFunds(allocation: Allocation, userId: string, needed: number, options: { transaction?: Transaction; lock?: boolean } = {}): Promise<Funds> {
  const balance = await allocationBalance(allocation.id, { transaction: options.transaction, lock: options.lock });
  const problems: Funds["problems"] = [];
  if (needed > balance.available) {
    problems.push({ code: "insufficient_allocation", needed, available: balance.available,
      message: `needs ${fmt(needed)} core-hours, ${fmt(balance.available)} available on allocation "${allocation.name}"` });
  }
  let cap: Funds["cap"] = null;
  if (allocation.perPersonCapCoreHours != null) {
    const used = (await usageByPerson(allocation.id, { transaction: options.transaction })).get(userId)?.used ?? 0;
    const remaining = Math.max(0, Math.round((allocation.perPersonCapCoreHours - used) * 1e4) / 1e4);
    cap = { limit: allocation.perPersonCapCoreHours, used, remaining };
    if (needed > remaining) {
      problems.push({ code: "insufficient_allocation", needed, available: remaining,
        message: `needs ${fmt(needed)} core-hours, ${fmt(remaining)} left of your per-person cap of ${fmt(cap.limit)} on "${allocation.name}" (${fmt(used)} used or held)` });
    }
  }
  return { needed, available: balance.available, cap, problems };
}

/** Throw the first funds problem as AppError("insufficient_allocation") with needed/available. */
export function assertFunds(funds: Funds): void {
  const p = funds.problems[0];
  if (p) throw new AppError("insufficient_allocation", p.message, { needed: p.needed, available: p.available, cap: funds.cap });
}
