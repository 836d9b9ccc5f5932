// check-allocation {allocationId}: the 80 % and 100 % use e-mails (lib/mail/allocation-alerts.ts) and
// the near-cap notices to people (lib/mail/cap-notices.ts), queued after anything that moves an
// allocation's ledger or caps (submission, settlement, grants, adjustments, caps).
import { AppError } from "@/lib/errors";
import { db } from "@/models";
import { checkAllocationAlerts } from "@/lib/mail/allocation-alerts";
import { checkCapNotices } from "@/lib/mail/cap-notices";
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
      // One transaction: the allocation alerts take the row lock first, the cap notices run under it.
      const { use, sent, messageId, rearmed, notices } = await db().sequelize.transaction(async (transaction) => {
        const check = await checkAllocationAlerts(data.allocationId, { transaction });
        return { ...check, notices: await checkCapNotices(data.allocationId, transaction) };
      });
      ctx?.log?.info({ allocationId: data.allocationId, use, sent, rearmed, notices }, "check-allocation");
      return { use, sent, messageId, rearmed, notices };
    } catch (err) {
      if (err instanceof AppError && (err.code === "not_found" || err.code === "bad_request")) throw new PermanentJobError(err.message, { cause: err });
      throw err; // database faults: transient; each crossing is written once under the row lock, so a retry cannot mail twice
    }
  },
  retry: { limit: 3, delaySeconds: 5, backoff: true },
});
