// collect-run {runId}: fetch, import, done, settle (broker/pipeline/collect.ts).
import { collectRun } from "@/broker/pipeline/collect";
import { uuidSchema } from "./dispatch-runs";
import { defineJob } from "./types";

export const collectRunJob = defineJob<{ runId: string }>({
  name: "collect-run",
  schema: { type: "object", required: ["runId"], properties: { runId: uuidSchema }, additionalProperties: false },
  // SFTP drops and database faults are transient. A rejected bundle is not an error here:
  // the run fails with import_rejected and the job completes.
  retry: { limit: 6, delaySeconds: 2, backoff: true },
  expireInSeconds: 600,
  concurrency: 2,
  async handle({ runId }, { log }) {
    const outcome = await collectRun(runId, log);
    log.info({ runId, outcome }, "collect");
    return { outcome };
  },
});
