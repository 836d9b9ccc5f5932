import "server-only";
// Read one observable's series of one run back: all its chunks in order, in one query.
import type { Transaction } from "sequelize";
import { modelsFor } from "@/lib/db/models-for";
import { AppError } from "@/lib/errors";

/** Options of {@link loadSeries}. */
export type LoadSeriesOptions = { transaction?: Transaction };

/**
 * The whole series of `observable` ("sweep" for the sweep numbers) of run `runId` as a
 * Float64Array, from its chunks in order. Throws AppError("not_found") when the run has no such
 * series, and "internal" when the chunks do not tile the series (a gap or overlap).
 */
export async function loadSeries(runId: string, observable: string, options: LoadSeriesOptions = {}): Promise<Float64Array> {
  const { sequelize } = modelsFor(options.transaction);
  const rows = (await sequelize.query(
    `SELECT chunk_index, start_row, "values" FROM series WHERE run_id = $1 AND observable = $2 ORDER BY chunk_index`,
    { bind: [runId, observable], transaction: options.transaction, plain: false, raw: true, type: "SELECT" },
  )) as unknown as { chunk_index: number; start_row: number; values: number[] }[];
  if (rows.length === 0) throw new AppError("not_found", `run ${runId} has no series "${observable}"`);
  let total = 0;
  for (const [i, r] of rows.entries()) {
    if (r.chunk_index !== i || r.start_row !== total) {
      throw new AppError("internal", `series "${observable}" of run ${runId}: chunk ${r.chunk_index} starts at row ${r.start_row}, expected chunk ${i} at row ${total}`);
    }
    total += r.values.length;
  }
  const out = new Float64Array(total);
  for (const r of rows) out.set(r.values, r.start_row);
  return out;
}

/** Names of the series stored for a run (observables plus "sweep"), in name order. */
export async function seriesNames(runId: string, options: LoadSeriesOptions = {}): Promise<string[]> {
  const { sequelize } = modelsFor(options.transaction);
  const rows = (await sequelize.query(`SELECT DISTINCT observable FROM series WHERE run_id = $1 ORDER BY observable`, {
    bind: [runId], transaction: options.transaction, type: "SELECT",
  })) as { observable: string }[];
  return rows.map((r) => r.observable);
}
