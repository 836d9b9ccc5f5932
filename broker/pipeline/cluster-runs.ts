// Queries for the runs the broker handles on one cluster.
import { QueryTypes } from "sequelize";
import { db, type Run } from "@/models";
import type { RunState } from "@/models/run";

/** Ids of runs in `states` whose ensemble is on `clusterId`, oldest first. */
export async function runIdsOnCluster(clusterId: string, states: RunState[], options: { limit?: number; activeEnsembles?: boolean } = {}): Promise<string[]> {
  const rows = await db().sequelize.query<{ id: string }>(
    `SELECT r.id FROM runs r JOIN ensembles e ON e.id = r.ensemble_id
     WHERE e.cluster_id = $1 AND r.state = ANY($2::text[]) ${options.activeEnsembles ? "AND e.state = 'active'" : ""}
     ORDER BY r.queued_at, r.id ${options.limit !== undefined ? "LIMIT $3" : ""}`,
    { bind: options.limit !== undefined ? [clusterId, states, options.limit] : [clusterId, states], type: QueryTypes.SELECT },
  );
  return rows.map((r) => r.id);
}

/** Runs by id, in the given order. */
export async function loadRuns(ids: string[]): Promise<Run[]> {
  if (ids.length === 0) return [];
  const runs = await db().Run.findAll({ where: { id: ids } });
  const byId = new Map(runs.map((r) => [r.id, r]));
  return ids.map((id) => byId.get(id)).filter((r): r is Run => r !== undefined);
}

/** Clusters the broker works on (active ones), by id. */
export async function activeClusters() {
  return db().Cluster.findAll({ where: { active: true }, order: [["name", "ASC"]] });
}
