// dispatch-runs {ensembleId}: dispatch the queued runs of the ensemble's cluster now, rather
// than at the next poll cycle (which would dispatch them too).
import { db } from "@/models";
import { serveCluster } from "@/broker/pipeline/cycle";
import { defineJob, PermanentJobError } from "./types";

const uuid = { type: "string", pattern: "^[0-9a-fA-F]{8}-[0-9a-fA-F]{4}-[0-9a-fA-F]{4}-[0-9a-fA-F]{4}-[0-9a-fA-F]{12}$" };

export const dispatchRunsJob = defineJob<{ ensembleId: string }>({
  name: "dispatch-runs",
  schema: { type: "object", required: ["ensembleId"], properties: { ensembleId: uuid }, additionalProperties: false },
  // SSH and database faults are transient; the poll cycle is the backstop if every retry fails.
  retry: { limit: 5, delaySeconds: 2, backoff: true },
  expireInSeconds: 600,
  async handle({ ensembleId }, { log }) {
    const ensemble = await db().Ensemble.findByPk(ensembleId);
    if (!ensemble) throw new PermanentJobError(`ensemble ${ensembleId} does not exist`);
    if (!ensemble.clusterId) throw new PermanentJobError(`ensemble ${ensembleId} has no cluster`);
    const cluster = await db().Cluster.findByPk(ensemble.clusterId);
    if (!cluster) throw new PermanentJobError(`cluster ${ensemble.clusterId} of ensemble ${ensembleId} does not exist`);
    const result = await serveCluster(cluster, log);
    log.info({ ensembleId, result }, "dispatch pass");
    return result;
  },
});

export { uuid as uuidSchema };
