// allocation-digest {}: the weekly allocation digest to coordinators (lib/mail/allocation-digest.ts),
// scheduled by pg-boss's cron every Monday at 07:00 UTC; may also be queued by hand. Idempotent:
// one e-mail per ISO week (dedupe key), so a retry or a second run in the same week sends nothing.
import { sendAllocationDigest } from "@/lib/mail/allocation-digest";
import { defineJob } from "./types";

export const allocationDigestJob = defineJob<Record<string, never>>({
  name: "allocation-digest",
  schema: { type: "object", additionalProperties: false, properties: {} },
  schedule: { cron: "0 7 * * 1", tz: "UTC" },
  async handle(_data, ctx) {
    const sent = await sendAllocationDigest(); // database faults: transient, retried
    ctx?.log?.info({ sent }, "allocation-digest");
    return sent;
  },
  retry: { limit: 3, delaySeconds: 30, backoff: true },
});
