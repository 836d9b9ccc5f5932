import "server-only";
// The "all runs have ended" e-mail an owner asks for with notify.onDone: true. Written once per
// ensemble (dedupeKey), in the transaction that gives the ensemble its final state.
import { QueryTypes, type Transaction } from "sequelize";
import { env } from "@/lib/env";
import { AppError } from "@/lib/errors";
import { coreHours } from "@/lib/format";
import { modelsFor } from "@/lib/db/models-for";
import { enqueueMail, type EnqueuedMail } from "./enqueue-mail";

const FINAL = ["done", "failed", "cancelled"];
const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

/** Whether the spec asks for the e-mail at the end (the spec schema's default is no). */
export function wantsDoneMail(spec: Record<string, unknown> | null | undefined): boolean {
  return ((spec?.notify ?? {}) as { onDone?: unknown }).onDone === true;
}

/**
 * Write the end-of-ensemble e-mail to the owner if the spec asks for it and the ensemble has its
 * final state; null when not wanted. Call it where the ensemble becomes final.
 */
export async function enqueueEnsembleDoneMail(ensembleId: string, options: { transaction?: Transaction } = {}): Promise<EnqueuedMail | null> {
  if (typeof ensembleId !== "string" || !UUID.test(ensembleId)) throw new AppError("bad_request", `ensemble id ${JSON.stringify(ensembleId)} is not a uuid`);
  const { Ensemble, User, sequelize } = modelsFor(options.transaction);
  const { transaction } = options;
  const ensemble = await Ensemble.findByPk(ensembleId, { transaction });
  if (!ensemble) throw new AppError("not_found", `ensemble ${ensembleId} does not exist`);
  if (!wantsDoneMail(ensemble.spec) || !FINAL.includes(ensemble.state)) return null;
  const owner = await User.findByPk(ensemble.ownerId, { transaction, attributes: ["email", "name"] });
  if (!owner) throw new AppError("internal", `ensemble ${ensembleId} has no owner row`);
  const counts = await sequelize.query<{ state: string; n: string; used: string | null }>(
    "SELECT state, count(*) AS n, sum(core_hours_used) AS used FROM runs WHERE ensemble_id = $1 GROUP BY state ORDER BY state",
    { type: QueryTypes.SELECT, transaction, bind: [ensembleId] },
  );
  const total = counts.reduce((s, c) => s + Number(c.n), 0);
  const used = counts.reduce((s, c) => s + Number(c.used ?? 0), 0);
  const text = [
    `Hello ${owner.name},`,
    "",
    `Every run of your ensemble "${ensemble.name}" has ended; the ensemble is ${ensemble.state}.`,
    `Runs: ${total} (${counts.map((c) => `${c.state} ${c.n}`).join(", ")})`,
    `Core-hours used: ${coreHours(used)} of ${coreHours(ensemble.reservedCoreHours)} reserved`,
    "",
    `Ensemble, estimates and exports: ${env.appUrl}/ensembles/${ensemble.id}`,
    "",
    "You receive this because the ensemble's spec has notify.onDone: true.",
  ].join("\n");
  return enqueueMail(
    { to: [owner.email], subject: `[Ergodex] Ensemble "${ensemble.name.replace(/[\r\n]+/g, " ").slice(0, 200)}" has ended (${ensemble.state})`,
      textBody: text, kind: "ensemble.done", dedupeKey: `ensemble-done:${ensembleId}` },
    { transaction },
  );
}
