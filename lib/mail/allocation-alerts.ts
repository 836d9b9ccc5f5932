import "server-only";
// The 80 % and 100 % use e-mails of an allocation: the work of the "check-allocation" job,
// which is queued after anything that changes an allocation's ledger.
//
// use = (charged + held) / (granted + adjusted): hours spent plus hours still set aside for runs,
// over what the allocation was given. Each threshold is mailed once, ever (Allocation.alertedAt80
// and alertedAt100, set in the transaction that writes the e-mail, under the allocation's row lock).
// A first check that already finds ≥ 100 % sends only the 100 % e-mail and marks 80 % as covered
// by it: two messages at the same moment would say one thing twice.
import type { Transaction } from "sequelize";
import { env } from "@/lib/env";
import { AppError } from "@/lib/errors";
import { coreHours, utc } from "@/lib/format";
import { modelsFor } from "@/lib/db/models-for";
import { allocationBalance, type AllocationBalance } from "@/lib/allocations/balance";
import { enqueueMail } from "./enqueue-mail";
import { emailsOfGroupLeads, emailsOfRoles } from "./recipients";

/** The thresholds, as fractions of the allocation. */
export const ALERT_THRESHOLDS = [0.8, 1] as const;

/** What a check found and which e-mail (if any) it wrote. */
export type AllocationCheck = { use: number; balance: AllocationBalance; sent: 80 | 100 | null; messageId: string | null };

/** Fraction of the allocation in use; 0 for nothing given and nothing used, Infinity for use without a grant. */
export function allocationUse(b: AllocationBalance): number {
  const given = b.granted + b.adjusted;
  const used = b.charged + b.held;
  if (!Number.isFinite(given) || !Number.isFinite(used)) throw new AppError("internal", `allocation balance is not finite (given ${given}, used ${used})`);
  if (given <= 0) return used > 0 ? Infinity : 0;
  return used / given;
}

const percent = (x: number) => (Number.isFinite(x) ? `${(100 * x).toFixed(1)} %` : "more than 100 % (nothing granted)");

/** Check allocation `allocationId` and write its 80 % or 100 % e-mail if due (see the top of this file). */
export async function checkAllocationAlerts(allocationId: string, options: { transaction?: Transaction } = {}): Promise<AllocationCheck> {
  const { sequelize, Allocation, Group } = modelsFor(options.transaction);
  const work = async (transaction: Transaction): Promise<AllocationCheck> => {
    // lock: concurrent checks of one allocation queue up here, so each threshold is written once.
    const balance = await allocationBalance(allocationId, { transaction, lock: true });
    const allocation = (await Allocation.findByPk(allocationId, { transaction }))!;
    const use = allocationUse(balance);
    const due: 80 | 100 | null = use >= 1 && !allocation.alertedAt100 ? 100 : use >= 0.8 && !allocation.alertedAt80 ? 80 : null;
    if (due === null) return { use, balance, sent: null, messageId: null };
    const group = await Group.findByPk(allocation.groupId, { transaction, attributes: ["name"] });
    const to = [...new Set([
      ...(await emailsOfRoles(["coordinator"], { transaction })),
      ...(await emailsOfGroupLeads(allocation.groupId, { transaction })),
    ])];
    const now = new Date();
    let messageId: string | null = null;
    if (to.length > 0) {
      const given = balance.granted + balance.adjusted;
      const text = [
        `Allocation "${allocation.name}" of ${group?.name ?? "its group"} has reached ${due} % use: ${percent(use)} is spent or held by runs.`,
        "",
        `Given:     ${coreHours(given)} core-hours (granted ${coreHours(balance.granted)}, adjusted ${coreHours(balance.adjusted)})`,
        `Charged:   ${coreHours(balance.charged)} core-hours`,
        `Held:      ${coreHours(balance.held)} core-hours reserved by runs not yet settled`,
        `Available: ${coreHours(balance.available)} core-hours for new submissions`,
        `Period:    ${utc(allocation.periodStart)} to ${utc(allocation.periodEnd)}`,
        "",
        due === 100
          ? "New submissions that need more than the available hours are refused. A coordinator can grant or adjust hours on the Allocations page."
          : "At 100 % new submissions are refused; a coordinator can grant more hours on the Allocations page.",
        `Allocations: ${env.appUrl}/allocations`,
        "",
        "You receive this as a coordinator or a PI of the group. Each threshold is mailed once.",
      ].join("\n");
      const mail = await enqueueMail(
        { to, subject: `[Ergodex] Allocation "${allocation.name}" at ${due} % use`, textBody: text, kind: `allocation.${due}`, dedupeKey: `allocation:${allocationId}:${due}` },
        { transaction },
      );
      messageId = mail.id;
    }
    // Marked even when nobody could be mailed: a later check would find nobody either, and a
    // coordinator added afterwards sees the figures on the Allocations page.
    await allocation.update(due === 100 ? { alertedAt100: now, alertedAt80: allocation.alertedAt80 ?? now } : { alertedAt80: now }, { transaction });
    return { use, balance, sent: due, messageId };
  };
  return options.transaction ? work(options.transaction) : sequelize.transaction(work);
}
