// verify-manuscript {verificationId}: re-hash and recompute everything beneath a frozen manuscript (lib/manuscripts/verify-manuscript.ts).
import type { QueueName } from "@/lib/queue/queues";
import { failVerification, runVerification, VERIFY_QUEUE } from "@/lib/manuscripts/verify-manuscript";
import { uuidSchema } from "./dispatch-runs";
import { defineJob } from "./types";

export const verifyManuscriptJob = defineJob<{ verificationId: string }>({
  // Not (yet) in lib/queue/queues.ts's list, which this engineer does not own; its policy defaults to "standard".
  name: VERIFY_QUEUE as QueueName,
  schema: { type: "object", required: ["verificationId"], properties: { verificationId: uuidSchema }, additionalProperties: false },
  // Database faults are transient and the work is idempotent (it rewrites its own report); two retries.
  retry: { limit: 2, delaySeconds: 5, backoff: true },
  expireInSeconds: 3600,
  async handle({ verificationId }, { log, retryCount }) {
    try {
      const report = await runVerification(verificationId);
      log.info({ verificationId, exhibits: report.exhibits.map((x) => `${x.label}: ${x.status}`) }, "verify-manuscript");
      return { exhibits: report.exhibits.length };
    } catch (err) {
      if (retryCount >= 2) await failVerification(verificationId, (err as Error).message);
      throw err;
    }
  },
});
