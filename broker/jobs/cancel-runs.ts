// cancel-runs {ensembleId}: the cluster side of a cancelled ensemble (broker/pipeline/cancel.ts).
import { db } from "@/models";
import { adapterFor } from "@/lib/clusters/adapter-for";
import { withLock } from "@/broker/pipeline/locks";
import { cancelEnsembleRuns } from "@/broker/pipeline/cancel";
import { uuidSchema } from "./dispatch-runs";
import { defineJob, PermanentJobError } from "./types";

export const cancelRunsJob = defineJob<{ ensembleId: string }>({
  name: "cancel-runs",
  schema: { type: "object", required: ["ensembleId"], properties: { ensembleId: uuidSchema }, additionalProperties: false },
  // An unreachable cluster is transient: keep trying, runs stay where they are meanwhile.
  retry: { limit: 8, delaySeconds: 2, backoff: true },
  expireInSeconds: 600,
  async handle({ ensembleId }, { log }) {
    const ensemble = await db().Ensemble.findByPk(ensembleId);
    if (!ensemble) throw new PermanentJobError(`ensemble ${ensembleId} does not exist`);
    const cluster = ensemble.clusterId ? await db().Cluster.findByPk(ensemble.clusterId) : null;
    if (!cluster) return cancelEnsembleRuns(ensembleId, null, log);
    const locked = await withLock(`cluster:${cluster.id}`, () => cancelEnsembleRuns(ensembleId, adapterFor(cluster), log));
    return locked.ran ? locked.value : null;
  },
});
