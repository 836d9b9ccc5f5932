import "server-only";
// Where a submission goes: the sampler row, the allocation it spends and the cluster it runs on.
import { Op, type Transaction } from "sequelize";
import { AppError, type FieldIssue } from "@/lib/errors";
import { modelsFor } from "@/lib/db/models-for";
import { RESEARCHERS } from "@/lib/auth/roles";
import type { Identity } from "@/lib/auth/identity";
import type { EnsembleSpec } from "@/lib/spec";
import type { Allocation, Cluster, Sampler } from "@/models";

/** The rows a spec resolves to. */
export type Placement = { sampler: Sampler; allocation: Allocation; cluster: Cluster };

const refuse = (issue: FieldIssue): never => { throw new AppError("invalid", `${issue.path} ${issue.message}`, { issues: [issue] }); };

/**
 * Core-hours one run reserves: cores × wall time, rounded *up* to the ledger's 4 decimals, so the
 * reservation always covers a run that uses its whole wall time (settlement caps charges at it).
 */
export function coreHoursPerRun(spec: Pick<EnsembleSpec, "resources">): number {
  // The 1e-6 keeps float noise (e.g. 0.30000000000000004 × 1e4) from rounding an exact value up.
  return Math.ceil(spec.resources.cores * spec.resources.wallMinutes * 1e4 / 60 - 1e-6) / 1e4;
}

/** Refuse callers who may not submit at all (the route guard checks this too; server actions and jobs call lib directly). */
export function assertMaySubmit(who: Identity): void {
  if (!RESEARCHERS.includes(who.role)) throw new AppError("forbidden", `submitting ensembles needs one of the roles: ${RESEARCHERS.join(", ")}`);
}

async function pickAllocation(who: Identity, spec: EnsembleSpec, transaction?: Transaction): Promise<Allocation> {
  const { Allocation } = modelsFor(transaction);
  const now = new Date();
  if (spec.allocation) {
    // An admin may spend any group's allocation; everyone else only their own groups'.
    const where = who.role === "admin" ? { name: spec.allocation } : { name: spec.allocation, groupId: who.groupIds };
    const found = await Allocation.findAll({ where, transaction });
    if (found.length === 0) return refuse({ path: "/allocation", message: `no allocation named "${spec.allocation}" in your groups` });
    if (found.length > 1) return refuse({ path: "/allocation", message: `"${spec.allocation}" names allocations of ${found.length} groups; ask an admin to rename one` });
    const a = found[0];
    if (a.periodStart > now || a.periodEnd <= now) {
      return refuse({ path: "/allocation", message: `allocation "${a.name}" runs from ${a.periodStart.toISOString().slice(0, 10)} to ${a.periodEnd.toISOString().slice(0, 10)}, not now` });
    }
    return a;
  }
  const current = await Allocation.findAll({
    where: { groupId: who.groupIds, periodStart: { [Op.lte]: now }, periodEnd: { [Op.gt]: now } }, order: [["name", "ASC"]], transaction,
  });
  if (current.length === 1) return current[0];
  if (current.length === 0) return refuse({ path: "/allocation", message: "none of your groups has an allocation for the current period; ask a coordinator" });
  return refuse({ path: "/allocation", message: `your groups have ${current.length} current allocations (${current.map((a) => a.name).join(", ")}); name one` });
}

async function pickCluster(spec: EnsembleSpec, allocation: Allocation, transaction?: Transaction): Promise<Cluster> {
  const { Cluster } = modelsFor(transaction);
  // An allocation granted on one active cluster places its ensembles there unless the spec says
  // otherwise; anywhere else, admission (lib/ensembles/funds.ts) explains the cluster limit.
  if (!spec.cluster && allocation.clusterId) {
    const c = await Cluster.findByPk(allocation.clusterId, { transaction });
    if (c?.active) return c;
  }
  if (spec.cluster) {
    const c = await Cluster.findOne({ where: { name: spec.cluster }, transaction });
    if (!c) return refuse({ path: "/cluster", message: `no cluster named "${spec.cluster}"` });
    if (!c.active) return refuse({ path: "/cluster", message: `cluster "${c.name}" is not taking new runs (inactive)` });
    return c;
  }
  const active = await Cluster.findAll({ where: { active: true }, order: [["name", "ASC"]], transaction });
  const fake = active.filter((c) => c.kind === "fake-ssh");
  if (active.length === 1) return active[0];
  if (fake.length === 1) return fake[0];
  if (active.length === 0) return refuse({ path: "/cluster", message: "no cluster is active; ask a coordinator" });
  return refuse({ path: "/cluster", message: `${active.length} clusters are active (${active.map((c) => c.name).join(", ")}); name one` });
}

/**
 * Resolve sampler, allocation and cluster of a spec for `who`: spec.allocation / spec.cluster by
 * name, else the only current allocation of the submitter's groups and its cluster if it is granted on
 * one, else the only active cluster (or the only active loopback one). Problems are AppError("invalid") naming the field.
 */
export async function resolvePlacement(who: Identity, spec: EnsembleSpec, transaction?: Transaction): Promise<Placement> {
  assertMaySubmit(who);
  const { Sampler } = modelsFor(transaction);
  const sampler = await Sampler.findOne({ where: spec.sampler, transaction });
  if (!sampler) refuse({ path: "/sampler/version", message: `${spec.sampler.name} ${spec.sampler.version} is not registered here` });
  const allocation = await pickAllocation(who, spec, transaction);
  // A pi leading the group is a member of it; only admins act outside their groups.
  if (who.role !== "admin" && !who.groupIds.includes(allocation.groupId)) {
    refuse({ path: "/allocation", message: `you are not a member of the group of allocation "${allocation.name}"` });
  }
  return { sampler: sampler!, allocation, cluster: await pickCluster(spec, allocation, transaction) };
}
