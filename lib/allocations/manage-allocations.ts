import "server-only";
// The allocation lifecycle (coordinators and admins): grant a new allocation, top it up, adjust it
// with a reason, suspend / resume / close it, set caps. Every change of hours is a ledger entry and
// every change of state or cap an appended row; each writes an audit entry and queues the
// allocation's alert check in the same transaction. Policy: an adjustment may not take away hours
// that are not free (available never goes below zero), and a closed allocation is final: no more
// hours, caps or states (runs still in flight settle on it as usual).
import { Op, QueryTypes, UniqueConstraintError, type Transaction } from "sequelize";
import { AppError, type FieldIssue } from "@/lib/errors";
import { recordAudit, type AuditSource } from "@/lib/audit/record-audit";
import { db, type Allocation } from "@/models";
import { enqueue } from "@/lib/queue/enqueue";
import { allocationBalance } from "./balance";
import { stateOf } from "./state";
import type { BalanceChangeInput, CapInput, GrantInput, StateChangeInput } from "./allocation-input";

const invalid = (issue: FieldIssue): never => { throw new AppError("invalid", `${issue.path} ${issue.message}`, { issues: [issue] }); };
const round4 = (x: number) => Math.round(x * 1e4) / 1e4;
const day = (s: string, path: string) => {
  const d = new Date(`${s}T00:00:00Z`);
  return Number.isNaN(d.getTime()) ? invalid({ path, message: "is not a date" }) : d;
};

/** Lock an allocation row and refuse a closed one. */
async function lockOpen(id: string, transaction: Transaction, what: string): Promise<Allocation> {
  const a = await db().Allocation.findByPk(id, { transaction, lock: transaction.LOCK.UPDATE });
  if (!a) throw new AppError("not_found", `allocation ${id} does not exist`);
  if ((await stateOf(id, { transaction })).state === "closed") throw new AppError("conflict", `allocation "${a.name}" is closed; ${what} is not possible any more`);
  return a;
}

const target = (a: Allocation) => ({ type: "allocation", id: a.id, groupId: a.groupId });

/** Grant a new allocation (group, optional cluster, period, first grant entry). */
export async function grantAllocation(audit: AuditSource, input: GrantInput): Promise<{ id: string; name: string }> {
  const periodStart = day(input.periodStart, "/periodStart");
  const periodEnd = day(input.periodEnd, "/periodEnd");
  if (periodEnd <= periodStart) invalid({ path: "/periodEnd", message: "must be after the start of the period" });
  const m = db();
  try {
    return await m.sequelize.transaction(async (transaction) => {
      if (!(await m.Group.findByPk(input.groupId, { transaction }))) invalid({ path: "/groupId", message: "no such group" });
      if (input.clusterId && !(await m.Cluster.findByPk(input.clusterId, { transaction }))) invalid({ path: "/clusterId", message: "no such cluster" });
      const a = await m.Allocation.create({ groupId: input.groupId, name: input.name.trim(), periodStart, periodEnd, clusterId: input.clusterId ?? null }, { transaction });
      await m.LedgerEntry.create({ allocationId: a.id, kind: "grant", coreHours: input.coreHours, userId: audit.actorId, note: input.note?.trim() || "initial grant" }, { transaction });
      await recordAudit(audit, "allocation.grant", target(a), { name: a.name, coreHours: input.coreHours, periodStart: input.periodStart, periodEnd: input.periodEnd, clusterId: a.clusterId }, transaction);
      return { id: a.id, name: a.name };
    });
  } catch (err) {
    if (err instanceof UniqueConstraintError) invalid({ path: "/name", message: "the group has an allocation of that name already" });
    throw err;
  }
}

/** Top up (a grant entry) or adjust (an adjust entry, reason required); refused if it would make available negative. */
export async function changeBalance(audit: AuditSource, allocationId: string, input: BalanceChangeInput): Promise<{ entryId: string; available: number }> {
  const reason = input.reason?.trim() ?? "";
  if (input.kind === "adjust" && reason.length < 3) invalid({ path: "/reason", message: "an adjustment needs a reason" });
  if (input.coreHours === 0) invalid({ path: "/coreHours", message: "must not be zero" });
  if (input.kind === "top-up" && input.coreHours < 0) invalid({ path: "/coreHours", message: "a top-up adds hours; take hours away with an adjustment" });
  const m = db();
  return m.sequelize.transaction(async (transaction) => {
    const a = await lockOpen(allocationId, transaction, "changing its hours");
    const before = await allocationBalance(a.id, { transaction });
    const after = round4(before.available + input.coreHours);
    if (after < 0) {
      throw new AppError("conflict", `adjusting by ${input.coreHours} would leave ${after} core-hours available on "${a.name}"; only ${before.available} are free (the rest is charged or held by runs)`,
        { issues: [{ path: "/coreHours", message: `at least ${-before.available}` }], available: before.available });
    }
    const entry = await m.LedgerEntry.create({
      allocationId: a.id, kind: input.kind === "top-up" ? "grant" : "adjust", coreHours: input.coreHours, userId: audit.actorId,
      note: reason || "top-up",
    }, { transaction });
    await recordAudit(audit, `allocation.${input.kind}`, target(a), { coreHours: input.coreHours, reason: reason || null, availableBefore: before.available, availableAfter: after }, transaction);
    await enqueue("check-allocation", { allocationId: a.id }, { transaction });
    return { entryId: entry.id, available: after };
  });
}

const TRANSITIONS: Record<string, string[]> = { active: ["suspended", "closed"], suspended: ["active", "closed"], closed: [] };

/** Suspend, resume or close an allocation: an appended state change with its reason, audited. */
export async function setAllocationState(audit: AuditSource, allocationId: string, input: StateChangeInput): Promise<{ state: string; previous: string }> {
  const reason = input.reason.trim();
  if (reason.length < 3) invalid({ path: "/reason", message: "say why" });
  const { sequelize } = db();
  return sequelize.transaction(async (transaction) => {
    const a = await lockOpen(allocationId, transaction, "changing its state");
    const { state: previous } = await stateOf(a.id, { transaction });
    if (!TRANSITIONS[previous].includes(input.state)) throw new AppError("conflict", `allocation "${a.name}" is ${previous}; it cannot become ${input.state}`);
    await sequelize.query("INSERT INTO allocation_state_changes (allocation_id, state, reason, actor_id) VALUES ($1, $2, $3, $4)",
      { type: QueryTypes.INSERT, bind: [a.id, input.state, reason, audit.actorId], transaction });
    await recordAudit(audit, `allocation.${input.state === "active" ? "resume" : input.state === "suspended" ? "suspend" : "close"}`, target(a), { from: previous, to: input.state, reason }, transaction);
    return { state: input.state, previous };
  });
}

/** Set or lift a cap (one appended row; the newest row per subject is in force). */
export async function setCap(audit: AuditSource, allocationId: string, input: CapInput): Promise<{ capId: string }> {
  if (input.coreHours !== undefined && input.share !== undefined) invalid({ path: "/share", message: "give core-hours or a share, not both" });
  if (input.subject === "person" && !input.userId) invalid({ path: "/userId", message: "a person's cap names the person" });
  if (input.subject !== "person" && input.userId) invalid({ path: "/userId", message: `a cap for ${input.subject === "everyone" ? "everyone" : "an ensemble"} names nobody` });
  const m = db();
  return m.sequelize.transaction(async (transaction) => {
    const a = await lockOpen(allocationId, transaction, "changing its caps");
    if (input.userId) {
      const member = await m.Membership.findOne({ where: { userId: input.userId, groupId: a.groupId }, transaction });
      if (!member) invalid({ path: "/userId", message: "is not a member of the allocation's group" });
    }
    const [row] = await m.sequelize.query<{ id: string }>(
      `INSERT INTO allocation_caps (allocation_id, subject, user_id, core_hours, share, reason, actor_id)
       VALUES ($1, $2, $3, $4, $5, $6, $7) RETURNING id::text AS id`,
      { type: QueryTypes.SELECT, bind: [a.id, input.subject, input.userId ?? null, input.coreHours ?? null, input.share ?? null, input.reason?.trim() || null, audit.actorId], transaction },
    );
    await recordAudit(audit, "allocation.cap", target(a), { subject: input.subject, userId: input.userId ?? null, coreHours: input.coreHours ?? null, share: input.share ?? null, reason: input.reason ?? null }, transaction);
    await enqueue("check-allocation", { allocationId: a.id }, { transaction });
    return { capId: row.id };
  });
}

/** Allocations whose period includes `at` (for the digest). */
export async function currentAllocations(at = new Date()): Promise<Allocation[]> {
  return db().Allocation.findAll({ where: { periodStart: { [Op.lte]: at }, periodEnd: { [Op.gt]: at } }, order: [["name", "ASC"]] });
}
