import "server-only";
// Caps inside an allocation, from the append-only allocation_caps table (newest row per subject wins;
// a row without a measure lifts the cap). Three subjects:
//   person    one named person's cap (overrides the default for them; lifting it falls back to the default)
//   everyone  the default cap of every person; without such a row the allocation's legacy
//             perPersonCapCoreHours column is the default (so allocations made before #8 keep their cap)
//   ensemble  the most one submission may reserve
// A measure is either absolute core-hours or a share of what the allocation was given
// (granted + adjusted), resolved to core-hours at the moment of the check.
import { QueryTypes, type Transaction } from "sequelize";
import { modelsFor } from "@/lib/db/models-for";
import type { Allocation } from "@/models";

export type CapSubject = "person" | "everyone" | "ensemble";
/** A cap as set: absolute core-hours or a share of the grant (exactly one). */
export type CapMeasure = { coreHours: number; share?: undefined } | { share: number; coreHours?: undefined };
/** The caps in force on one allocation. */
export type CapsInForce = {
  everyone: (CapMeasure & { source: "caps" | "allocation" }) | null;
  persons: Map<string, CapMeasure>;
  ensemble: CapMeasure | null;
};

type Row = { subject: CapSubject; user_id: string | null; core_hours: string | null; share: string | null };

const measureOf = (r: Row): CapMeasure | null =>
  r.core_hours !== null ? { coreHours: Number(r.core_hours) } : r.share !== null ? { share: Number(r.share) } : null;

/** The caps in force on `allocation` (see the top of this file). */
export async function capsInForce(allocation: Allocation, options: { transaction?: Transaction } = {}): Promise<CapsInForce> {
  const { sequelize } = modelsFor(options.transaction);
  const rows = await sequelize.query<Row>(
    `SELECT DISTINCT ON (subject, user_id) subject, user_id, core_hours::text, share::text
       FROM allocation_caps WHERE allocation_id = $1 ORDER BY subject, user_id, id DESC`,
    { type: QueryTypes.SELECT, bind: [allocation.id], transaction: options.transaction },
  );
  const persons = new Map<string, CapMeasure>();
  let everyone: CapsInForce["everyone"] = allocation.perPersonCapCoreHours != null ? { coreHours: allocation.perPersonCapCoreHours, source: "allocation" } : null;
  let ensemble: CapMeasure | null = null;
  for (const r of rows) {
    const m = measureOf(r);
    if (r.subject === "person") { if (m) persons.set(r.user_id!, m); }
    else if (r.subject === "everyone") everyone = m ? { ...m, source: "caps" } : null;
    else ensemble = m;
  }
  return { everyone, persons, ensemble };
}

const round4 = (x: number) => Math.round(x * 1e4) / 1e4;

/** A measure in core-hours, given what the allocation was given. */
export function capLimit(measure: CapMeasure, given: number): number {
  return measure.coreHours !== undefined ? measure.coreHours : round4(Math.max(0, given) * measure.share!);
}

/** The cap that applies to `userId` (their own, else the default) in core-hours, or null for none. */
export function personLimit(caps: CapsInForce, userId: string, given: number): { limit: number; measure: CapMeasure; personal: boolean } | null {
  const own = caps.persons.get(userId);
  if (own) return { limit: capLimit(own, given), measure: own, personal: true };
  return caps.everyone ? { limit: capLimit(caps.everyone, given), measure: caps.everyone, personal: false } : null;
}

/** "50 core-hours" or "25 % of the grant", for messages. */
export function describeMeasure(m: CapMeasure): string {
  return m.coreHours !== undefined ? `${m.coreHours.toLocaleString("en")} core-hours` : `${(m.share! * 100).toLocaleString("en", { maximumFractionDigits: 2 })} % of the grant`;
}
