import "server-only";
// The 80 % and 100 % use e-mails of an allocation: the work of the "check-allocation" job, queued
// after anything that changes an allocation's ledger or caps (submission, settlement, grants, caps).
//
// use = charged / (granted + adjusted): hours really spent over what the allocation was given.
// Held hours (reservations of runs not yet settled) are left out on purpose: a reservation is an
// upper bound that mostly comes back as a release, and counting it would mail on every large
// submission and re-arm on every settlement. What a reservation blocks is shown by admission
// control instead (lib/ensembles/funds.ts).
//
// Once per crossing: Allocation.alertedAt80 / alertedAt100 mark a threshold as mailed. When use
// falls back below a threshold (a top-up or positive adjustment) its mark is cleared, re-arming
// it; the next crossing mails again. Marks are set and cleared under the allocation's row lock in
// the transaction that writes the e-mail, and each crossing's e-mail carries a dedupe key with
// the newest ledger entry at that moment, so a retried job cannot mail one crossing twice.
// A check that finds ≥ 100 % with neither mark sends only the 100 % e-mail and marks 80 % as
// covered by it: two messages at the same moment would say one thing twice.
import { QueryTypes, type Transaction } from "sequelize";
import { env } from "@/lib/env";
import { AppError } from "@/lib/errors";
import { coreHours, utc } from "@/lib/format";
import { modelsFor } from "@/lib/db/models-for";
import { allocationBalance, type AllocationBalance } from "@/lib/allocations/balance";
import { enqueueMail } from "./enqueue-mail";
import { emailsOfGroupLeads, emailsOfRoles } from "./recipients";

/** The thresholds, as fractions of the allocation. */
export const ALERT_THRESHOLDS = [0.8, 1] as const;

/** What a check found, which e-mail (if any) it wrote and which thresholds it re-armed. */
export type AllocationCheck = { use: number; balance: AllocationBalance; sent: 80 | 100 | null; messageId: string | null; rearmed: (80 | 100)[] };

/** Fraction of the allocation charged; 0 for nothing given and nothing charged, Infinity for a charge without a grant. */
export function allocationUse(b: AllocationBalance): number {
  const given = b.granted + b.adjusted;
  const used = b.charged;
  if (!Number.isFinite(given) || !Number.isFinite(used)) throw new AppError("internal", `allocation balance is not finite (given ${given}, charged ${used})`);
  if (given <= 0) return used > 0 ? Infinity : 0;
  return used / given;
}

const percent = (x: number) => (Number.isFinite(x) ? `${(100 * x).toFixed(1)} %` : "more than 100 % (nothing granted)");

/** Check allocation `allocationId`: re-arm thresholds use fell below, write the 80 % or 100 % e-mail if due. */
export async function checkAllocationAlerts(allocationId: string, options: { transaction?: Transaction } = {}): Promise<AllocationCheck> {
  const { sequelize, Allocation, Group } = modelsFor(options.transaction);
  const work = async (transaction: Transaction): Promise<AllocationCheck> => {
    // lock: concurrent checks of one allocation queue up here, so each crossing is written once.
    const balance = await allocationBalance(allocationId, { transaction, lock: true });
    const allocation = (await Allocation.findByPk(allocationId, { transaction }))!;
    const use = allocationUse(balance);
    const rearmed: (80 | 100)[] = [];
    if (use < 0.8 && allocation.alertedAt80) rearmed.push(80);
    if (use < 1 && allocation.alertedAt100) rearmed.push(100);
    if (rearmed.length) {
      await allocation.update({ ...(rearmed.includes(80) ? { alertedAt80: null } : {}), ...(rearmed.includes(100) ? { alertedAt100: null } : {}) }, { transaction });
    }
    const due: 80 | 100 | null = use >= 1 && !allocation.alertedAt100 ? 100 : use >= 0.8 && !allocation.alertedAt80 ? 80 : null;
    if (due === null) return { use, balance, sent: null, messageId: null, rearmed };
    const group = await Group.findByPk(allocation.groupId, { transaction, attributes: ["name"] });
    const to = [...new Set([
      ...(await emailsOfRoles(["coordinator"], { transaction })),
      ...(await emailsOfGroupLeads(allocation.groupId, { transaction })),
    ])];
    const now = new Date();
    let messageId: string | null = null;
    if (to.length > 0) {
      const given = balance.granted + balance.adjusted;
      const [{ last }] = await sequelize.query<{ last: string | null }>(
        "SELECT max(id)::text AS last FROM ledger_entries WHERE allocation_id = $1", { type: QueryTypes.SELECT, bind: [allocationId], transaction });
      const text = [
        `Allocation "${allocation.name}" of ${group?.name ?? "its group"} has reached ${due} % use: ${percent(use)} of what it was given is charged.`,
        "",
        `Given:     ${coreHours(given)} core-hours (granted ${coreHours(balance.granted)}, adjusted ${coreHours(balance.adjusted)})`,
        `Charged:   ${coreHours(balance.charged)} core-hours`,
        `Held:      ${coreHours(balance.held)} core-hours reserved by runs not yet settled`,
        `Available: ${coreHours(balance.available)} core-hours for new submissions`,
        `Period:    ${utc(allocation.periodStart)} to ${utc(allocation.periodEnd)}`,
        "",
        due === 100
          ? "Everything given is spent: new submissions are refused. A coordinator can top up or adjust the allocation on the Allocations page."
          : "At 100 % new submissions are refused; a coordinator can top up the allocation on the Allocations page.",
        `Allocations: ${env.appUrl}/allocations/${allocation.id}`,
        "",
        "You receive this as a coordinator or a PI of the group. Each threshold is mailed once per crossing; a top-up that brings use below it re-arms it.",
      ].join("\n");
      const mail = await enqueueMail(
        { to, subject: `[Ergodex] Allocation "${allocation.name}" at ${due} % use`, textBody: text, kind: `allocation.${due}`, dedupeKey: `allocation:${allocationId}:${due}:${last ?? 0}` },
        { transaction },
      );
      messageId = mail.id;
    }
    // Marked even when nobody could be mailed: a later check would find nobody either, and a
    // coordinator added afterwards sees the figures on the Allocations page.
    await allocation.update(due === 100 ? { alertedAt100: now, alertedAt80: allocation.alertedAt80 ?? now } : { alertedAt80: now }, { transaction });
    return { use, balance, sent: due, messageId, rearmed };
  };
  return options.transaction ? work(options.transaction) : sequelize.transaction(work);
}
