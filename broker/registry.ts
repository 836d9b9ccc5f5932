// Every job the broker runs. Retry rules live in each definition (and broker/jobs/run-job.ts says
// what is never retried); queue policies in lib/queue/queues.ts.
import type { JobDefinition } from "./jobs/types";
import { dispatchRunsJob } from "./jobs/dispatch-runs";
import { pollClustersJob } from "./jobs/poll-clusters";
import { collectRunJob } from "./jobs/collect-run";
import { cancelRunsJob } from "./jobs/cancel-runs";
import { sendMailJob } from "./jobs/send-mail";
import { failureDigestJob } from "./jobs/failure-digest";
import { checkAllocationJob } from "./jobs/check-allocation";
import { verifyManuscriptJob } from "./jobs/verify-manuscript";
import { allocationDigestJob } from "./jobs/allocation-digest";
import { replayRunJob } from "./jobs/replay-run";

/** The registry: one entry per queue the broker works. */
export const JOBS: readonly JobDefinition<never>[] = [
  dispatchRunsJob, pollClustersJob, collectRunJob, cancelRunsJob, sendMailJob, failureDigestJob, checkAllocationJob, verifyManuscriptJob,
  replayRunJob, allocationDigestJob,
] as unknown as JobDefinition<never>[];
