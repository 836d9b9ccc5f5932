// replay-run {replayId}: run a done run's run.json again on its own cluster and compare the result with
// the archive (lib/provenance/replay/). The cluster is reached through the same adapter and the same
// run.json builder as dispatch; the replay is not a run (no Run row, no import, no ledger entry).
//
// On the cluster the replay runs under its own id (the replay's uuid): the node keeps one work dir per
// id and the original run's dir still holds the archived attempt. So the staged run.json is the run's
// own, field for field, except runId; the samplers do not read runId into the chain or the series.
import fs from "node:fs";
import path from "node:path";
import crypto from "node:crypto";
import type { Logger } from "pino";
import { db } from "@/models";
import { env } from "@/lib/env";
import { adapterFor } from "@/lib/clusters/adapter-for";
import { buildRunInput } from "@/lib/runs/run-input";
import { attemptCoreHours } from "@/lib/runs/attempt-core-hours";
import { compareBundle } from "@/lib/provenance/replay/compare-bundle";
import { failReplay, markReplayRunning, recordReplay, replayStatus, REPLAY_QUEUE } from "@/lib/provenance/replay/replay-run";
import type { QueueName } from "@/lib/queue/queues";
import type { ClusterAdapter, RunStatus } from "@/broker/adapters/types";
import { ClusterError } from "@/broker/adapters/errors";
import { resourcesFor } from "@/broker/pipeline/dispatch";
import { uuidSchema } from "./dispatch-runs";
import { defineJob, PermanentJobError } from "./types";

const RETRIES = 4;
const sha = (v: unknown) => crypto.createHash("sha256").update(JSON.stringify(v)).digest("hex");
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

/** Wait for the replay to end on the cluster; gives up (transient, so retried) after the wall time plus a margin. */
async function waitForEnd(adapter: ClusterAdapter, id: string, wallSeconds: number): Promise<RunStatus> {
  const until = Date.now() + (wallSeconds + 300) * 1000;
  let delay = 250;
  for (;;) {
    const [s] = await adapter.status([id]);
    if (s && s.state !== "queued" && s.state !== "running") return s;
    if (Date.now() > until) throw new ClusterError(`replay ${id} still ${s?.state ?? "unknown"} after its wall time`, "timeout", true);
    await sleep(delay);
    delay = Math.min(delay * 2, 2_000);
  }
}

/** Carry out replay `replayId`; returns its outcome. */
export async function replayRun(replayId: string, log: Logger): Promise<string> {
  const replay = await replayStatus(replayId);
  if (!replay) throw new PermanentJobError(`replay ${replayId} does not exist`);
  if (replay.state !== "queued" && replay.state !== "running") return replay.state; // done before (a duplicate job)
  const { Run, Ensemble, ParameterPoint, Sampler, Cluster } = db();
  const run = await Run.findByPk(replay.runId);
  const ensemble = run && await Ensemble.findByPk(run.ensembleId);
  const cluster = ensemble?.clusterId ? await Cluster.findByPk(ensemble.clusterId) : null;
  const point = run && await ParameterPoint.findByPk(run.pointId);
  const sampler = ensemble && await Sampler.findByPk(ensemble.samplerId);
  if (!run || !ensemble || !cluster || !point || !sampler) {
    await failReplay(replayId, `run ${replay.runId} has no cluster, point or sampler to replay on`);
    return "failed";
  }
  await markReplayRunning(replayId);
  const spec = ensemble.spec as Record<string, unknown>;
  let runJson, own;
  try {
    runJson = buildRunInput({ run: { id: replayId, seed: run.seed }, point, spec, sampler });
    own = buildRunInput({ run, point, spec, sampler });
  } catch (err) {
    // The spec no longer yields a valid run.json: no retry changes that.
    await failReplay(replayId, `run.json of run ${run.id} cannot be rebuilt: ${(err as Error).message}`);
    return "failed";
  }
  const resources = resourcesFor(spec, cluster);
  const adapter = adapterFor(cluster);
  const base = { cluster: cluster.name, runJson: { replaySha256: sha(runJson), runSha256: sha(own) } };

  // Staging and submitting again after a crash are no-ops on the node (same id, same token).
  await adapter.stage([{ runId: replayId, runJson }]);
  const [sub] = await adapter.submit([{ runId: replayId, dispatchToken: `replay-${replayId}`, resources }]);
  if (!sub.accepted) {
    if (sub.error.code === "conflict" || sub.error.code === "not_staged") throw new ClusterError(`replay refused for now: ${sub.error.message}`, sub.error.code, true);
    await failReplay(replayId, `the cluster refused the replay: ${sub.error.code}: ${sub.error.message}`, base);
    return "failed";
  }
  log.info({ replayId, runId: run.id, cluster: cluster.name, jobId: sub.jobId }, "replay submitted");
  const end = await waitForEnd(adapter, replayId, resources.wallSeconds);
  const coreHours = attemptCoreHours(resources.cores, end.startedAt, end.finishedAt);
  if (end.state !== "exited" || end.exitCode !== 0) {
    const why = end.failure ? `${end.failure.reason}: ${end.failure.detail}` : `ended ${end.state}${end.exitCode !== null ? ` with exit code ${end.exitCode}` : ""}`;
    await failReplay(replayId, `the replayed sampler did not finish: ${why}`, { ...base, coreHours });
    return "failed";
  }
  const dir = path.join(env.dataDir, "tmp", `replay-${replayId}-${crypto.randomBytes(4).toString("hex")}`);
  fs.mkdirSync(dir, { recursive: true });
  try {
    await adapter.fetch(replayId, dir);
    const compared = await compareBundle(run.id, dir);
    await recordReplay(replayId, { ...compared, ...base, coreHours, charged: false });
    log.info({ replayId, runId: run.id, outcome: compared.outcome, differences: compared.differences }, "replay compared");
    return compared.outcome;
  } finally {
    fs.rmSync(dir, { recursive: true, force: true });
  }
}

export const replayRunJob = defineJob<{ replayId: string }>({
  name: REPLAY_QUEUE as QueueName,
  schema: { type: "object", required: ["replayId"], properties: { replayId: uuidSchema }, additionalProperties: false },
  // SSH drops, a busy node and database faults are transient; the work is idempotent (same id and token on the node).
  retry: { limit: RETRIES, delaySeconds: 5, backoff: true },
  // The handler waits on the cluster for the whole chain (a replay is one run, small by design).
  expireInSeconds: 3 * 3600,
  async handle({ replayId }, { log, retryCount }) {
    try {
      return { outcome: await replayRun(replayId, log) };
    } catch (err) {
      // A wrong host key or refused client key needs a person; anything else gets its retries first.
      const last = retryCount >= RETRIES || (err instanceof ClusterError && !err.transient);
      if (last && !(err instanceof PermanentJobError)) await failReplay(replayId, (err as Error).message).catch(() => undefined);
      throw err;
    }
  },
});
