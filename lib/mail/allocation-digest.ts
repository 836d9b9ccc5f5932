import "server-only";
// The weekly allocation digest for coordinators (the "allocation-digest" job, Mondays 07:00 UTC):
// for every allocation whose period includes the moment, its state, given / charged / held / free,
// the share charged against the share of the period gone, the burn rate and run-out date, what
// was charged in the last 7 days and by whom (top three). One e-mail per ISO week (dedupe key).
import { QueryTypes } from "sequelize";
import { env } from "@/lib/env";
import { coreHours } from "@/lib/format";
import { db } from "@/models";
import { balancesForAllocations } from "@/lib/allocations/balance";
import { BURN_WINDOW_DAYS, burnRate } from "@/lib/allocations/burn";
import { currentAllocations } from "@/lib/allocations/manage-allocations";
import { statesOf } from "@/lib/allocations/state";
import { dailyCharges } from "@/lib/allocations/usage";
import { enqueueMail } from "./enqueue-mail";
import { emailsOfRoles } from "./recipients";

/** ISO 8601 week of a date, e.g. "2026-W49". */
export function isoWeek(d: Date): string {
  const t = new Date(Date.UTC(d.getUTCFullYear(), d.getUTCMonth(), d.getUTCDate()));
  const dow = t.getUTCDay() || 7;
  t.setUTCDate(t.getUTCDate() + 4 - dow); // the week's Thursday decides its year
  const yearStart = Date.UTC(t.getUTCFullYear(), 0, 1);
  const week = Math.ceil(((t.getTime() - yearStart) / 86_400_000 + 1) / 7);
  return `${t.getUTCFullYear()}-W${String(week).padStart(2, "0")}`;
}

const pct = (x: number) => `${(100 * x).toFixed(0)} %`;

/** The digest's subject and text at `now` (null when no allocation is current). */
export async function allocationDigestText(now = new Date()): Promise<{ subject: string; text: string; allocations: number } | null> {
  const m = db();
  const allocations = await currentAllocations(now);
  if (allocations.length === 0) return null;
  const [balances, states, groups] = await Promise.all([
    balancesForAllocations(allocations.map((a) => a.id)), statesOf(allocations.map((a) => a.id)),
    m.Group.findAll({ where: { id: [...new Set(allocations.map((a) => a.groupId))] } }),
  ]);
  const groupName = new Map(groups.map((g) => [g.id, g.name]));
  const weekAgo = new Date(now.getTime() - 7 * 86_400_000);
  const sections: string[] = [];
  for (const a of allocations) {
    const b = balances.get(a.id)!;
    const given = b.granted + b.adjusted;
    const burn = burnRate(await dailyCharges(a.id), given, b.charged, b.available, a.periodStart, a.periodEnd, now);
    const top = await m.sequelize.query<{ name: string | null; ch: string }>(
      `SELECT u.name, sum(e.core_hours) AS ch FROM ledger_entries e LEFT JOIN users u ON u.id = e.user_id
        WHERE e.allocation_id = $1 AND e.kind = 'charge' AND e.created_at >= $2 AND e.created_at < $3
        GROUP BY u.name ORDER BY sum(e.core_hours) DESC LIMIT 3`,
      { type: QueryTypes.SELECT, bind: [a.id, weekAgo, now] },
    );
    const week = top.reduce((s, r) => s + Number(r.ch), 0);
    const state = states.get(a.id)!;
    sections.push([
      `${a.name} — ${groupName.get(a.groupId) ?? "?"}${state.state === "active" ? "" : ` [${state.state.toUpperCase()}: ${state.reason}]`}`,
      `  given ${coreHours(given)}, charged ${coreHours(b.charged)} (${pct(burn.chargedShare)}), held ${coreHours(b.held)}, free ${coreHours(b.available)} core-hours`,
      `  period ${pct(burn.elapsed)} gone (${a.periodStart.toISOString().slice(0, 10)} to ${a.periodEnd.toISOString().slice(0, 10)}); even spending would be ${coreHours(burn.linePerDay)} core-hours/day`,
      `  burn rate ${coreHours(burn.ratePerDay)} core-hours/day over the last ${Math.min(BURN_WINDOW_DAYS, Math.floor(burn.windowDays))} days; ` +
        (burn.runOut ? `free hours run out on ${burn.runOut}${burn.runsOutEarly ? " — BEFORE the period ends" : ", after the period ends"}` : "no charges lately, no run-out date"),
      `  last 7 days: ${coreHours(week)} core-hours charged${top.length ? ` — ${top.map((r) => `${r.name ?? "(nobody)"} ${coreHours(Number(r.ch))}`).join(", ")}` : ""}`,
    ].join("\n"));
  }
  const early = allocations.filter((_a, i) => sections[i].includes("BEFORE the period ends")).length;
  const text = [
    `Allocations this week (${isoWeek(now)}): ${allocations.length} current${early ? `, ${early} on course to run out before the period ends` : ""}.`,
    "",
    ...sections.flatMap((s) => [s, ""]),
    `Allocations: ${env.appUrl}/allocations`,
    "You receive this weekly as a coordinator.",
  ].join("\n");
  return { subject: `[Ergodex] Allocations digest ${isoWeek(now)}`, text, allocations: allocations.length };
}

/** Write this week's digest to the outbox (once per ISO week); null when there is nothing or nobody to tell. */
export async function sendAllocationDigest(now = new Date()): Promise<{ messageId: string; created: boolean } | null> {
  const digest = await allocationDigestText(now);
  const to = await emailsOfRoles(["coordinator"]);
  if (!digest || to.length === 0) return null;
  const mail = await enqueueMail({ to, subject: digest.subject, textBody: digest.text, kind: "allocation.digest", dedupeKey: `allocation-digest:${isoWeek(now)}` });
  return { messageId: mail.id, created: mail.created };
}
