import "server-only";
// The monthly usage report of an allocation as CSV, for a group's reports: one row per UTC month
// with the allocation's totals (who = "all"), then one row per person with use that month.
// Figures are the month's ledger movements, not balances: granted/adjusted/reserved/charged/released.
// Researchers and viewers get the totals and their own rows only (same rule as lib/allocations/usage.ts).
import { QueryTypes } from "sequelize";
import { AppError } from "@/lib/errors";
import { db } from "@/models";
import type { Identity } from "@/lib/auth/identity";
import { seesAllRows } from "./usage";

type Row = { month: string; total_row: number; user_id: string | null; name: string | null; email: string | null; granted: string; adjusted: string; reserved: string; charged: string; released: string };

// RFC 4180 quoting; a leading = + - @ is prefixed with ' so a spreadsheet does not run it as a formula.
const cell = (v: string | number) => {
  let s = String(v);
  if (typeof v === "string" && /^[=+\-@]/.test(s)) s = `'${s}`;
  return /[",\n\r]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
};

/** The CSV text and a file name for allocation `id`, as `who` may see it. */
export async function monthlyReportCsv(who: Identity, id: string): Promise<{ fileName: string; csv: string }> {
  const m = db();
  const a = await m.Allocation.findByPk(id);
  if (!a) throw new AppError("not_found", "allocation not found");
  const full = seesAllRows(who, a);
  const rows = await m.sequelize.query<Row>(
    `SELECT to_char(date_trunc('month', e.created_at AT TIME ZONE 'UTC'), 'YYYY-MM') AS month,
            GROUPING(e.user_id) AS total_row, e.user_id, max(u.name) AS name, max(u.email) AS email,
            coalesce(sum(e.core_hours) FILTER (WHERE e.kind = 'grant'), 0) AS granted,
            coalesce(sum(e.core_hours) FILTER (WHERE e.kind = 'adjust'), 0) AS adjusted,
            coalesce(sum(e.core_hours) FILTER (WHERE e.kind = 'reserve'), 0) AS reserved,
            coalesce(sum(e.core_hours) FILTER (WHERE e.kind = 'charge'), 0) AS charged,
            coalesce(sum(e.core_hours) FILTER (WHERE e.kind = 'release'), 0) AS released
       FROM ledger_entries e LEFT JOIN users u ON u.id = e.user_id
      WHERE e.allocation_id = $1
      GROUP BY GROUPING SETS ((1), (1, e.user_id))
      ORDER BY 1, GROUPING(e.user_id) DESC, max(u.name)`,
    { type: QueryTypes.SELECT, bind: [a.id] },
  );
  const lines = [["month", "who", "email", "granted", "adjusted", "reserved", "charged", "released"].join(",")];
  for (const r of rows) {
    const total = Number(r.total_row) === 1;
    // person rows: only use (reserve/charge/release) entries, grants by a coordinator are the allocation's, not theirs
    if (!total && Number(r.reserved) === 0 && Number(r.charged) === 0 && Number(r.released) === 0) continue;
    if (!total && !full && r.user_id !== who.userId) continue;
    const who_ = total ? "all" : r.name ?? "(nobody)";
    const [g, ad] = total ? [r.granted, r.adjusted] : ["0", "0"];
    lines.push([r.month, who_, total ? "" : r.email ?? "", Number(g), Number(ad), Number(r.reserved), Number(r.charged), Number(r.released)].map(cell).join(","));
  }
  const slug = a.name.toLowerCase().replace(/[^a-z0-9]+/g, "-").replace(/^-|-$/g, "") || "allocation";
  return { fileName: `${slug}-monthly.csv`, csv: `${lines.join("\n")}\n` };
}
