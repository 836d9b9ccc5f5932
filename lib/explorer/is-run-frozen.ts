import "server-only";
// Whether a run lies beneath a frozen manuscript, so its estimates may no longer change.
import type { Transaction } from "sequelize";
import { QueryTypes } from "sequelize";
import { modelsFor } from "@/lib/db/models-for";

/**
 * True when a frozen manuscript rests on the run. Where the provenance schema exists (its freeze
 * writes provenance.frozen_items), that table decides: the run itself, or one of its estimates
 * or its point's estimates. Otherwise an exhibit snapshot or query of a frozen manuscript naming
 * the run, its point or one of their estimates counts (ids are UUIDs, so a text search cannot
 * match by accident). The database triggers allow a new estimate version beside a frozen one, so
 * the refusal of a re-analysis is this check's job, not the triggers'.
 */
export async function isRunFrozen(runId: string, transaction?: Transaction): Promise<boolean> {
  const { sequelize } = modelsFor(transaction);
  const ids = `SELECT $1::uuid::text AS id UNION SELECT point_id::text FROM runs WHERE id = $1::uuid
       UNION SELECT id::text FROM estimates WHERE run_id = $1::uuid
       UNION SELECT es.id::text FROM estimates es JOIN runs r ON r.point_id = es.point_id WHERE r.id = $1::uuid AND es.scope = 'point'`;
  const [{ present }] = await sequelize.query<{ present: boolean }>(`SELECT to_regclass('provenance.frozen_items') IS NOT NULL AS present`,
    { type: QueryTypes.SELECT, transaction });
  const sql = present
    ? `WITH ids AS (${ids}) SELECT EXISTS (SELECT 1 FROM provenance.frozen_items f JOIN ids ON ids.id = f.item_key
         JOIN manuscripts m ON m.id = f.manuscript_id WHERE f.item_kind IN ('run', 'estimate') AND m.state = 'frozen') AS frozen`
    : `WITH ids AS (${ids}) SELECT EXISTS (SELECT 1 FROM exhibits x JOIN manuscripts m ON m.id = x.manuscript_id, ids
         WHERE m.state = 'frozen' AND (coalesce(x.snapshot::text, '') LIKE '%' || ids.id || '%' OR x.query::text LIKE '%' || ids.id || '%')) AS frozen`;
  const rows = await sequelize.query<{ frozen: boolean }>(sql, { type: QueryTypes.SELECT, bind: [runId], transaction });
  return Boolean(rows[0]?.frozen);
}
