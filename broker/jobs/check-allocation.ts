// check-allocation {allocationId}: the 80 % and 100 % use e-mails (lib/mail/allocation-alerts.ts),
// queued after anything that moves an allocation's ledger (submission, settlement, grants).
import { AppError } from "@/lib/errors";
import { checkAllocationAlerts } from "@/lib/mail/allocation-alerts";
import { defineJob, PermanentJobError } from "./types";

export const checkAllocationJob = defineJob<{ allocationId: string }>({
  name: "check-allocation",
  schema: {
    type: "object",
    additionalProperties: false,
    required: ["allocationId"],
    properties: { allocationId: { type: "string", format: "uuid" } },
  },
  async handle(data, ctx) {
    try {
      const { use, sent, messageId } = await checkAllocationAlerts(data.allocationId);
      ctx?.log?.info({ allocationId: data.allocationId, use, sent }, "check-allocation");
      return { use, sent, messageId };
    } catch (err) {
      if (err instanceof AppError && (err.code === "not_found" || err.code === "bad_request")) throw new PermanentJobError(err.message, { cause: err });
      throw err; // database faults: transient; each threshold is written once under the row lock, so a retry cannot mail twice
    }
  },
  retry: { limit: 3, delaySeconds: 5, backoff: true },
});
