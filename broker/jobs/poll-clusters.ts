// poll-clusters {}: one broker cycle over every cluster (poll, then dispatch into free slots).
// The broker queues it every ERGODEX_POLL_SECONDS; the queue's "short" policy keeps at most one
// waiting, so several brokers or a slow cycle never pile cycles up.
import { runCycle } from "@/broker/pipeline/cycle";
import { defineJob } from "./types";

export const pollClustersJob = defineJob<Record<string, never>>({
  name: "poll-clusters",
  schema: { type: "object", additionalProperties: false },
  // Not retried: the next cycle is never more than a poll interval away.
  retry: { limit: 0, delaySeconds: 0, backoff: false },
  expireInSeconds: 300,
  async handle(_data, { log }) {
    const result = await runCycle(log);
    log.debug({ result }, "poll cycle");
    return result;
  },
});
