import "server-only";
// Admission control: may this submission reserve `needed` core-hours on this allocation? Shared by
// preview, submit and resubmit. Checked in order, all reported: the allocation's state (suspended,
// closed), its cluster, its free balance, the person's cap, the per-ensemble ceiling. A refusal
// explains itself: what was needed, what is free under the limit that bit, and who to ask.
// Near-cap rule (#8): a person whose use (charged + held) would reach 80 % of their cap with this
// submission gets a warning; the e-mail of the same rule is sent by lib/mail/cap-notices.ts.
import type { Transaction } from "sequelize";
import { AppError } from "@/lib/errors";
import { allocationBalance, usageByPerson } from "@/lib/allocations/balance";
import { capLimit, capsInForce, describeMeasure, personLimit } from "@/lib/allocations/caps";
import { allocationContacts, askLine, type Contact } from "@/lib/allocations/contacts";
import { stateOf, type AllocationState } from "@/lib/allocations/state";
import type { Allocation } from "@/models";

/** Which limit refused a submission. */
export type AdmissionLimit = "suspended" | "closed" | "cluster" | "allocation_balance" | "person_cap" | "ensemble_ceiling";

/** One refusal: the limit, what was needed and what that limit leaves free, in core-hours. */
export type FundsProblem = { code: "insufficient_allocation"; limit: AdmissionLimit; message: string; needed: number; available: number };

/** Why a submission is refused, for forms, API bodies and the CLI. */
export type AdmissionExplanation = {
  limit: AdmissionLimit;
  needed: number;
  free: number;
  allocation: { id: string; name: string; state: AllocationState };
  contacts: Contact[];
  message: string;
};

/** The figures behind a funds decision, in core-hours. */
export type Funds = {
  needed: number;
  available: number;
  state: AllocationState;
  /** null when no per-person cap applies to this person. */
  cap: { limit: number; used: number; remaining: number; rule: string } | null;
  /** null when the allocation sets no per-ensemble ceiling. */
  ceiling: { limit: number; rule: string } | null;
  problems: FundsProblem[];
  warnings: string[];
  explanation: AdmissionExplanation | null;
};

/** Share of the cap at which a person is warned (and mailed once per crossing). */
export const NEAR_CAP = 0.8;

const fmt = (x: number) => x.toLocaleString("en", { maximumFractionDigits: 4 });
const round4 = (x: number) => Math.round(x * 1e4) / 1e4;

/**
 * Check `needed` against `allocation` for `userId` (see the top of this file). With lock: true
 * (inside a transaction) the allocation row is locked first, so the answer holds until commit.
 * `clusterId` is where the runs would go, refused when the allocation is for another cluster.
 */
export async function checkFunds(
  allocation: Allocation, userId: string, needed: number,
  options: { transaction?: Transaction; lock?: boolean; clusterId?: string | null } = {},
): Promise<Funds> {
  if (!Number.isFinite(needed) || needed < 0) throw new AppError("bad_request", `core-hours needed must be a non-negative number, got ${needed}`);
  const { transaction } = options;
  const balance = await allocationBalance(allocation.id, { transaction, lock: options.lock });
  const { state } = await stateOf(allocation.id, { transaction });
  const caps = await capsInForce(allocation, { transaction });
  const given = balance.granted + balance.adjusted;
  const on = `allocation "${allocation.name}"`;
  const problems: FundsProblem[] = [];
  const warnings: string[] = [];
  const refuse = (limit: AdmissionLimit, available: number, message: string) => problems.push({ code: "insufficient_allocation", limit, needed, available, message });

  if (state !== "active") {
    refuse(state, 0, `${on} is ${state}: it takes no new submissions${state === "suspended" ? " until a coordinator resumes it" : ""}`);
  }
  if (allocation.clusterId && options.clusterId && allocation.clusterId !== options.clusterId) {
    refuse("cluster", 0, `${on} is for another cluster than the one this submission goes to; name that cluster or another allocation`);
  }
  if (needed > balance.available) {
    refuse("allocation_balance", balance.available, `needs ${fmt(needed)} core-hours, ${fmt(balance.available)} available on ${on}`);
  }
  let cap: Funds["cap"] = null;
  const person = personLimit(caps, userId, given);
  if (person) {
    const used = (await usageByPerson(allocation.id, { transaction })).get(userId)?.used ?? 0;
    const remaining = Math.max(0, round4(person.limit - used));
    const rule = `${person.personal ? "your own cap" : "the cap for everyone"}: ${describeMeasure(person.measure)}`;
    cap = { limit: person.limit, used, remaining, rule };
    if (needed > remaining) {
      refuse("person_cap", remaining, `needs ${fmt(needed)} core-hours, ${fmt(remaining)} left of your per-person cap of ${fmt(cap.limit)} on "${allocation.name}" (${fmt(used)} used or held; ${rule})`);
    } else if (person.limit > 0 && used + needed >= NEAR_CAP * person.limit) {
      warnings.push(`after this submission you will have used or held ${fmt(round4(used + needed))} of your ${fmt(person.limit)} core-hour cap on "${allocation.name}" (${Math.round((100 * (used + needed)) / person.limit)} %); later submissions beyond ${fmt(remaining - needed)} more core-hours will be refused`);
    }
  }
  let ceiling: Funds["ceiling"] = null;
  if (caps.ensemble) {
    ceiling = { limit: capLimit(caps.ensemble, given), rule: describeMeasure(caps.ensemble) };
    if (needed > ceiling.limit) refuse("ensemble_ceiling", ceiling.limit, `needs ${fmt(needed)} core-hours, more than the per-ensemble ceiling of ${fmt(ceiling.limit)} on ${on} (${ceiling.rule}); split the scan into smaller ensembles`);
  }

  let explanation: AdmissionExplanation | null = null;
  if (problems.length > 0) {
    const contacts = await allocationContacts(allocation.id, allocation.groupId, { transaction });
    const first = problems[0];
    // Who to ask goes on every message: the form, the API body and the CLI all show messages as they are.
    for (const p of problems) p.message = `${p.message}. ${askLine(contacts)}`;
    explanation = { limit: first.limit, needed, free: first.available, allocation: { id: allocation.id, name: allocation.name, state }, contacts, message: first.message };
  }
  return { needed, available: balance.available, state, cap, ceiling, problems, warnings, explanation };
}

/** Throw the first funds problem as AppError("insufficient_allocation") with the explanation as details. */
export function assertFunds(funds: Funds): void {
  const p = funds.problems[0];
  if (!p || !funds.explanation) return;
  const { message: _m, ...explained } = funds.explanation;
  throw new AppError("insufficient_allocation", p.message, {
    ...explained, needed: p.needed, available: p.available, cap: funds.cap, ceiling: funds.ceiling,
    problems: funds.problems.map(({ limit, message, available }) => ({ limit, message, available })),
  });
}
