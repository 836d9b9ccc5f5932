import "server-only";
// The near-cap notice: a person whose use of an allocation (charged + held, the figure caps are
// enforced on) reaches 80 % of their cap (NEAR_CAP in lib/ensembles/funds.ts) is mailed once per
// crossing, before a submission of theirs is refused. A mark in allocation_cap_notices records the
// notice; it is removed when their use falls below 80 % again (a release, a raised cap), re-arming it.
// Run by the "check-allocation" job beside the 80 % / 100 % allocation alerts.
import { QueryTypes, type Transaction } from "sequelize";
import { env } from "@/lib/env";
import { coreHours } from "@/lib/format";
import { modelsFor } from "@/lib/db/models-for";
import { allocationBalance, usageByPerson } from "@/lib/allocations/balance";
import { capsInForce, describeMeasure, personLimit } from "@/lib/allocations/caps";
import { allocationContacts, askLine } from "@/lib/allocations/contacts";
import { NEAR_CAP } from "@/lib/ensembles/funds";
import { enqueueMail } from "./enqueue-mail";

/** Who was mailed and whose mark was cleared by one check. */
export type CapNoticeCheck = { notified: string[]; rearmed: string[] };

/** Mail every person newly at ≥ 80 % of their cap on `allocationId`; re-arm those back below. Call under the allocation's row lock. */
export async function checkCapNotices(allocationId: string, transaction: Transaction): Promise<CapNoticeCheck> {
  const { sequelize, Allocation, User } = modelsFor(transaction);
  const allocation = (await Allocation.findByPk(allocationId, { transaction }))!;
  const balance = await allocationBalance(allocationId, { transaction });
  const caps = await capsInForce(allocation, { transaction });
  const usage = await usageByPerson(allocationId, { transaction });
  const marks = new Set((await sequelize.query<{ user_id: string }>(
    "SELECT user_id FROM allocation_cap_notices WHERE allocation_id = $1", { type: QueryTypes.SELECT, bind: [allocationId], transaction })).map((r) => r.user_id));
  const given = balance.granted + balance.adjusted;
  const out: CapNoticeCheck = { notified: [], rearmed: [] };
  const [{ last }] = await sequelize.query<{ last: string | null }>(
    "SELECT max(id)::text AS last FROM ledger_entries WHERE allocation_id = $1", { type: QueryTypes.SELECT, bind: [allocationId], transaction });
  const everyone = new Set([...usage.keys(), ...marks]);
  for (const userId of everyone) {
    const cap = personLimit(caps, userId, given);
    const used = usage.get(userId)?.used ?? 0;
    const near = cap !== null && cap.limit > 0 && used >= NEAR_CAP * cap.limit;
    if (!near && marks.has(userId)) {
      await sequelize.query("DELETE FROM allocation_cap_notices WHERE allocation_id = $1 AND user_id = $2", { bind: [allocationId, userId], transaction });
      out.rearmed.push(userId);
    }
    if (!near || marks.has(userId)) continue;
    const user = await User.findByPk(userId, { transaction, attributes: ["email", "name", "active"] });
    await sequelize.query("INSERT INTO allocation_cap_notices (allocation_id, user_id) VALUES ($1, $2)", { bind: [allocationId, userId], transaction });
    out.notified.push(userId);
    if (!user?.active) continue;
    const contacts = await allocationContacts(allocationId, allocation.groupId, { transaction });
    const left = Math.max(0, cap!.limit - used);
    const text = [
      `Dear ${user.name},`,
      "",
      `you have used or hold ${coreHours(used)} of your ${coreHours(cap!.limit)} core-hour cap on allocation "${allocation.name}" (${Math.round((100 * used) / cap!.limit)} %; ${cap!.personal ? "your own cap" : "the cap for everyone"}: ${describeMeasure(cap!.measure)}).`,
      `${coreHours(left)} core-hours are left to you. A submission that needs more is refused.`,
      "Held hours come back when runs finish under their wall time, so the figure may fall again.",
      "",
      `If you need more: ${askLine(contacts)}`,
      `Allocation: ${env.appUrl}/allocations/${allocation.id}`,
      "",
      `You are told once when you pass ${Math.round(NEAR_CAP * 100)} % of your cap, and again only after dropping below it and passing it anew.`,
    ].join("\n");
    await enqueueMail({
      to: [user.email], subject: `[Ergodex] You are near your cap on "${allocation.name}"`, textBody: text, kind: "allocation.near-cap",
      dedupeKey: `allocation-cap:${allocationId}:${userId}:${last ?? 0}`,
    }, { transaction });
  }
  return out;
}
