// The demo's allocation history (invented): last period's allocation of the demo group, granted,
// topped up, adjusted, used month by month by the group's PI and researcher, and closed. Rows are
// written only when the allocation is first created, so a second seed run changes nothing. The
// current allocation is left as it is (its balance is what the other demo flows start from).
import { QueryTypes, type Transaction } from "sequelize";
import type { Models } from "@/models";

export const DEMO_PAST_ALLOCATION = {
  name: "RGL compute 2025–26",
  periodStart: new Date("2025-10-01T00:00:00Z"),
  periodEnd: new Date("2026-10-01T00:00:00Z"),
  grantCoreHours: 200_000,
};

// Core-hours charged per month, October 2025 to September 2026 (invented; rising towards spring).
const MONTHLY = [9_000, 12_000, 14_000, 15_500, 16_000, 17_500, 18_000, 19_000, 19_500, 20_000, 19_000, 17_000];

/** Create the past allocation with its history if it does not exist; returns what was created. */
export async function seedAllocationHistory(m: Models, groupId: string, people: { coordinatorId: string | null; piId: string | null; researcherId: string | null }, transaction: Transaction): Promise<string[]> {
  const [alloc, created] = await m.Allocation.findOrCreate({
    where: { groupId, name: DEMO_PAST_ALLOCATION.name },
    defaults: { groupId, name: DEMO_PAST_ALLOCATION.name, periodStart: DEMO_PAST_ALLOCATION.periodStart, periodEnd: DEMO_PAST_ALLOCATION.periodEnd },
    transaction,
  });
  if (!created) return [];
  const insert = (kind: string, coreHours: number, at: string, userId: string | null, note: string) => m.sequelize.query(
    "INSERT INTO ledger_entries (allocation_id, kind, core_hours, user_id, note, created_at) VALUES ($1, $2, $3, $4, $5, $6)",
    { type: QueryTypes.INSERT, bind: [alloc.id, kind, coreHours, userId, note, new Date(at)], transaction });
  await insert("grant", DEMO_PAST_ALLOCATION.grantCoreHours, "2025-09-24T10:00:00Z", people.coordinatorId, "demo grant for the 2025–26 period");
  for (let i = 0; i < MONTHLY.length; i++) {
    const month = new Date(Date.UTC(2025, 9 + i, 1)).toISOString().slice(0, 7);
    // 60 % by the researcher, 40 % by the PI; reserved with a quarter to spare, the spare released at settlement
    for (const [userId, share, day] of [[people.researcherId, 0.6, "08"], [people.piId, 0.4, "17"]] as const) {
      const charge = MONTHLY[i] * share;
      await insert("reserve", charge * 1.25, `${month}-${day}T09:00:00Z`, userId, "demo scans");
      await insert("charge", charge, `${month}-${day}T21:00:00Z`, userId, "demo settlement");
      await insert("release", charge * 0.25, `${month}-${day}T21:00:00Z`, userId, "demo settlement");
    }
  }
  await insert("grant", 20_000, "2026-03-16T11:00:00Z", people.coordinatorId, "top-up from the institute's spring call");
  await insert("adjust", -5_000, "2026-06-22T11:00:00Z", people.coordinatorId, "hours lent for the summer school returned to the institute pool");
  await m.sequelize.query("INSERT INTO allocation_state_changes (allocation_id, state, reason, actor_id, created_at) VALUES ($1, 'closed', $2, $3, $4)",
    { type: QueryTypes.INSERT, bind: [alloc.id, "period ended; final usage report sent to the institute", people.coordinatorId, new Date("2026-10-02T09:00:00Z")], transaction });
  return [`allocation ${alloc.name} with a year of history, closed`];
}
