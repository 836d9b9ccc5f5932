// failure-digest {ensembleId}: one e-mail to the owner about every failure of the ensemble not
// reported yet (lib/mail/failure-digest.ts). Queued by the broker when a run fails, singleton per
// ensemble with a short delay, so failures close together share one digest.
import { AppError } from "@/lib/errors";
import { sendFailureDigest } from "@/lib/mail/failure-digest";
import { defineJob, PermanentJobError } from "./types";

export const failureDigestJob = defineJob<{ ensembleId: string }>({
  name: "failure-digest",
  schema: {
    type: "object",
    additionalProperties: false,
    required: ["ensembleId"],
    properties: { ensembleId: { type: "string", format: "uuid" } },
  },
  async handle(data, ctx) {
    try {
      const outcome = await sendFailureDigest(data.ensembleId);
      ctx?.log?.info({ ensembleId: data.ensembleId, status: outcome.status, runs: outcome.runIds.length }, "failure-digest");
      return outcome;
    } catch (err) {
      if (err instanceof AppError && (err.code === "not_found" || err.code === "bad_request")) throw new PermanentJobError(err.message, { cause: err });
      throw err; // database faults: transient; a retry writes the digest once (events are marked in its transaction)
    }
  },
  retry: { limit: 3, delaySeconds: 5, backoff: true },
});
