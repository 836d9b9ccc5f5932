import "server-only";
// Settlement of one run: charge what it used, release the rest of its reservation.
//
// A run's outstanding reservation is its share of the ensemble's reserve entry
// (run.reservedCoreHours) plus any reserve entries written for it alone (a resubmission),
// minus whatever charge/release entries already carry its runId. What it used is the sum of
// the core-hours of all its attempts, as recorded in the RunEvent detail of every transition
// that ended an attempt (collecting, failed, cancelled): the event log is the one record
// that survives a retry, which clears the per-attempt columns. Settling twice finds nothing
// outstanding and writes nothing, so the function is idempotent; the run row is locked so
// that two settlements of one run cannot interleave.
import { QueryTypes, type Transaction } from "sequelize";
import { AppError } from "@/lib/errors";
import { modelsFor } from "@/lib/db/models-for";
import { enqueue } from "@/lib/queue/enqueue";

/** What a settlement wrote (zeros when there was nothing outstanding). */
export type Settlement = { runId: string; charged: number; released: number; usedCoreHours: number; alreadySettled: boolean };

// Ledger amounts are numeric(16,4): work in integer units of 1e-4 core-hours so sums stay exact.
const units = (x: number) => Math.round(x * 1e4);
const hours = (u: number) => u / 1e4;

/** Charge cores × elapsed of every attempt (capped at the reservation) and release the rest, in one transaction. */
export async function settleRun(runId: string, options: { transaction?: Transaction; note?: string } = {}): Promise<Settlement> {
  const { sequelize, Run, Ensemble, LedgerEntry } = modelsFor(options.transaction);
  const work = async (transaction: Transaction): Promise<Settlement> => {
    const run = await Run.findByPk(runId, { transaction, lock: transaction.LOCK.UPDATE });
    if (!run) throw new AppError("not_found", `run ${runId} does not exist`);
    const ensemble = await Ensemble.findByPk(run.ensembleId, { transaction });
    if (!ensemble) throw new AppError("not_found", `ensemble ${run.ensembleId} of run ${runId} does not exist`);
    const [sums] = await sequelize.query<{ reserved: string; charged: string; released: string; used: string }>(
      `SELECT
         coalesce((SELECT sum(core_hours) FROM ledger_entries WHERE run_id = $1 AND kind = 'reserve'), 0) AS reserved,
         coalesce((SELECT sum(core_hours) FROM ledger_entries WHERE run_id = $1 AND kind = 'charge'), 0) AS charged,
         coalesce((SELECT sum(core_hours) FROM ledger_entries WHERE run_id = $1 AND kind = 'release'), 0) AS released,
         coalesce((SELECT sum((detail->>'coreHours')::numeric) FROM run_events
                   WHERE run_id = $1 AND to_state IN ('collecting', 'failed', 'cancelled') AND detail ? 'coreHours'), 0) AS used`,
      { bind: [runId], transaction, type: QueryTypes.SELECT },
    );
    const outstanding = units(run.reservedCoreHours) + units(Number(sums.reserved)) - units(Number(sums.charged)) - units(Number(sums.released));
    const usedUnits = units(Number(sums.used));
    const base = { runId, usedCoreHours: hours(usedUnits) };
    if (outstanding <= 0) return { ...base, charged: 0, released: 0, alreadySettled: true };
    if (!ensemble.allocationId) throw new AppError("conflict", `run ${runId} holds a reservation but its ensemble has no allocation`);
    const charge = Math.min(Math.max(usedUnits - units(Number(sums.charged)), 0), outstanding);
    const release = outstanding - charge;
    const entry = { allocationId: ensemble.allocationId, ensembleId: ensemble.id, runId, userId: ensemble.ownerId };
    const note = options.note ?? `settlement of run ${runId} (attempt ${run.attempt}, ${run.state})`;
    const rows = [];
    if (charge > 0) rows.push({ ...entry, kind: "charge" as const, coreHours: hours(charge), note });
    if (release > 0) rows.push({ ...entry, kind: "release" as const, coreHours: hours(release), note });
    await LedgerEntry.bulkCreate(rows, { transaction });
    // The allocation's use moved: its 80 %/100 % alerts are re-checked (one waiting check per allocation).
    await enqueue("check-allocation", { allocationId: ensemble.allocationId }, { transaction });
    return { ...base, charged: hours(charge), released: hours(release), alreadySettled: false };
  };
  return options.transaction ? work(options.transaction) : sequelize.transaction(work);
}
