import "server-only";
// A refused bundle leaves one trace: an Import row with state "rejected" and the reason, in its own transaction.
import type { Sequelize } from "sequelize";
import type { RunSource } from "@/models/run";
import { IMPORTER_VERSION } from "./bundle-hash";

/** What is known about a refused bundle. */
export type Rejection = {
  bundleHash: string;
  runId: string | null;
  source: RunSource;
  uploadedById?: string | null;
  originalNames: string[];
  reason: string;
};

/**
 * Write (or refresh) the rejected Import row for `bundleHash` in a transaction of its own, so
 * it survives the rollback of the import. A bundle refused again keeps one row with the latest
 * reason; an accepted row with the same hash (a concurrent good import) is never overwritten.
 */
export async function recordRejection(sequelize: Sequelize, r: Rejection): Promise<string | null> {
  return sequelize.transaction(async (transaction) => {
    const [rows] = (await sequelize.query(
      `INSERT INTO imports (run_id, source, uploaded_by_id, original_names, bundle_hash, state, reject_reason, importer_version)
       VALUES ($1, $2, $3, $4::jsonb, $5, 'rejected', $6, $7)
       ON CONFLICT (bundle_hash) DO UPDATE SET reject_reason = EXCLUDED.reject_reason, run_id = EXCLUDED.run_id,
         importer_version = EXCLUDED.importer_version, created_at = now()
       WHERE imports.state = 'rejected'
       RETURNING id`,
      { bind: [r.runId, r.source, r.uploadedById ?? null, JSON.stringify(r.originalNames), r.bundleHash, r.reason.slice(0, 4000), IMPORTER_VERSION], transaction },
    )) as [{ id: string }[], unknown];
    return rows[0]?.id ?? null;
  });
}
