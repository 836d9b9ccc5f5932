import "server-only";
// Group-scope targets of ensemble and run routes: which group a request acts on, and whose it is.
import { db } from "@/models";
import { AppError } from "@/lib/errors";
import { checkScope, type Target } from "@/lib/auth/scope";
import type { Identity } from "@/lib/auth/identity";
import type { Transaction } from "sequelize";
import type { Ensemble } from "@/models";

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

/** The scope target of an ensemble, or null when there is none with that id. */
export async function ensembleTarget(id: string): Promise<Target | null> {
  if (!UUID.test(id)) return null;
  const e = await db().Ensemble.findByPk(id, { attributes: ["id", "groupId", "ownerId"] });
  return e ? { type: "ensemble", id: e.id, groupId: e.groupId, ownerId: e.ownerId } : null;
}

/** The scope target of a run: its ensemble's group and owner. */
export async function runTarget(id: string): Promise<Target | null> {
  if (!UUID.test(id)) return null;
  const r = await db().Run.findByPk(id, { attributes: ["id", "ensembleId"], include: [{ association: "ensemble", attributes: ["groupId", "ownerId"] }] });
  return r?.ensemble ? { type: "run", id: r.id, groupId: r.ensemble.groupId, ownerId: r.ensemble.ownerId } : null;
}

/**
 * Load and row-lock an ensemble `who` may act on (owner, a PI leading its group, admin); the route
 * guard checked this already, but lib functions are also called from server actions and jobs.
 */
export async function lockEnsembleForAct(who: Identity, ensembleId: string, transaction: Transaction): Promise<Ensemble> {
  if (!UUID.test(ensembleId)) throw new AppError("not_found", "ensemble not found");
  const e = await db().Ensemble.findByPk(ensembleId, { transaction, lock: transaction.LOCK.UPDATE });
  if (!e) throw new AppError("not_found", "ensemble not found");
  checkScope(who, { type: "ensemble", id: e.id, groupId: e.groupId, ownerId: e.ownerId }, "act");
  return e;
}
