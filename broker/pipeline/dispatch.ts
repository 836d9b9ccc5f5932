// Dispatch: queued runs of one cluster → staged run.json → submitted → dispatched.
//
// Idempotent by construction. Every run gets its dispatch token committed before anything is
// sent. A run that already had a token when this round began may have been submitted by a
// broker that died before recording it: the cluster is asked first (one status call), and a
// run it holds under the same token is only recorded as dispatched, never submitted again.
// Submitting with the same token is also a no-op on the node, so even a lost reply is safe.
import { QueryTypes } from "sequelize";
import type { Logger } from "pino";
import { db, type Cluster, type Run } from "@/models";
import { AppError } from "@/lib/errors";
import { buildRunInput } from "@/lib/runs/run-input";
import { transitionRun } from "@/lib/runs/transition-run";
import { failRun } from "@/lib/runs/fail-run";
import type { ClusterAdapter, RunResources, SubmitRequest } from "@/broker/adapters/types";
import { loadRuns, runIdsOnCluster } from "./cluster-runs";

/** Runs handled per round trip batch; the adapter splits further where its protocol needs to. */
const BATCH = 500;

/** What one dispatch pass did. */
export type DispatchOutcome = { submitted: number; reconciled: number; refused: number; cancelledOnCluster: number };

/** Per-run resources: the spec's, with the wall time capped by the cluster's own limit (settings.maxWallSeconds). */
export function resourcesFor(spec: Record<string, unknown>, cluster: Cluster): RunResources {
  const r = (spec.resources ?? {}) as { cores?: number; wallMinutes?: number; memoryMb?: number };
  const wanted = Math.round((r.wallMinutes ?? 60) * 60);
  const cap = Number(cluster.settings?.maxWallSeconds);
  return { cores: r.cores ?? 1, wallSeconds: Number.isFinite(cap) && cap > 0 ? Math.min(wanted, cap) : wanted, memoryMb: r.memoryMb ?? 1024 };
}

/** Dispatch as many queued runs of `cluster` as its slot limit allows (call under the cluster lock). */
export async function dispatchCluster(cluster: Cluster, adapter: ClusterAdapter, log: Logger): Promise<DispatchOutcome> {
  const out: DispatchOutcome = { submitted: 0, reconciled: 0, refused: 0, cancelledOnCluster: 0 };
  if (!cluster.active || !cluster.healthy) return out;
  for (;;) {
    const busy = (await runIdsOnCluster(cluster.id, ["dispatched", "running"])).length;
    const room = Math.min(cluster.slotLimit - busy, BATCH);
    if (room <= 0) return out;
    const ids = await runIdsOnCluster(cluster.id, ["queued"], { limit: room, activeEnsembles: true });
    if (ids.length === 0) return out;
    const before = { ...out };
    await dispatchBatch(cluster, adapter, await loadRuns(ids), out, log);
    // Nothing moved (all refused for now): leave the rest for the next round instead of spinning.
    if (out.submitted === before.submitted && out.reconciled === before.reconciled) return out;
  }
}

async function dispatchBatch(cluster: Cluster, adapter: ClusterAdapter, runs: Run[], out: DispatchOutcome, log: Logger): Promise<void> {
  const { Run: RunModel, Ensemble, ParameterPoint, Sampler } = db();
  // 1. Tokens first, committed on their own: from here on a crash leaves a trail to reconcile.
  const fresh = runs.filter((r) => !r.dispatchToken);
  if (fresh.length > 0) {
    const rows = await db().sequelize.query<{ id: string; token: string }>(
      `UPDATE runs SET dispatch_token = gen_random_uuid()::text, updated_at = now()
       WHERE id = ANY($1::uuid[]) AND state = 'queued' AND dispatch_token IS NULL
       RETURNING id, dispatch_token AS token`,
      { bind: [fresh.map((r) => r.id)], type: QueryTypes.SELECT },
    );
    const tokens = new Map(rows.map((r) => [r.id, r.token]));
    for (const r of fresh) r.dispatchToken = tokens.get(r.id) ?? null;
  }
  const inPlay = runs.filter((r) => r.dispatchToken);

  // 2. Reconcile runs that had a token before this round: what does the cluster already hold?
  const earlier = inPlay.filter((r) => !fresh.includes(r));
  const held = new Map<string, string | null>(); // runId → scheduler job id, for runs the node has under our token
  if (earlier.length > 0) {
    for (const s of await adapter.status(earlier.map((r) => r.id))) {
      const run = earlier.find((r) => r.id === s.runId)!;
      if (s.state !== "unknown" && s.dispatchToken === run.dispatchToken) held.set(s.runId, s.jobId);
    }
  }
  const toSubmit = inPlay.filter((r) => !held.has(r.id));

  // 3. Stage run.json and submit.
  const ensembles = new Map((await Ensemble.findAll({ where: { id: [...new Set(runs.map((r) => r.ensembleId))] } })).map((e) => [e.id, e]));
  const points = new Map((await ParameterPoint.findAll({ where: { id: [...new Set(toSubmit.map((r) => r.pointId))] } })).map((p) => [p.id, p]));
  const samplers = new Map((await Sampler.findAll({ where: { id: [...new Set([...ensembles.values()].map((e) => e.samplerId))] } })).map((s) => [s.id, s]));
  const requests: SubmitRequest[] = [];
  const stage = [];
  for (const run of toSubmit) {
    const ensemble = ensembles.get(run.ensembleId)!;
    const spec = ensemble.spec as Record<string, unknown>;
    try {
      const runJson = buildRunInput({ run, point: points.get(run.pointId)!, spec, sampler: samplers.get(ensemble.samplerId)! });
      stage.push({ runId: run.id, runJson });
      requests.push({ runId: run.id, dispatchToken: run.dispatchToken!, resources: resourcesFor(spec, cluster) });
    } catch (err) {
      // A run.json that cannot be built will not build on retry either.
      await failQuietly(run.id, "dispatch_failed", (err as Error).message, log);
      out.refused++;
    }
  }
  if (stage.length > 0) await adapter.stage(stage);
  const results = await adapter.submit(requests);

  // 4. Record what the cluster accepted (and what it already had) as dispatched.
  const accepted = new Map<string, string | null>(held);
  for (const r of results) {
    if (r.accepted) accepted.set(r.runId, r.jobId);
    else if (r.error.code === "conflict" || r.error.code === "not_staged") {
      // The node still runs an earlier attempt, or lost the staged file: try again next round.
      log.warn({ runId: r.runId, error: r.error }, "submission refused for now");
      out.refused++;
    } else {
      await failQuietly(r.runId, "dispatch_failed", `${r.error.code}: ${r.error.message}`, log);
      out.refused++;
    }
  }
  const cancelLater: string[] = [];
  for (const batch of chunks([...accepted.entries()], 200)) {
    await db().sequelize.transaction(async (transaction) => {
      for (const [runId, jobId] of batch) {
        try {
          await transitionRun(runId, "dispatched", {
            cause: held.has(runId) ? "broker.dispatch.reconciled" : "broker.dispatch", transaction,
            patch: { schedulerJobId: jobId, workDir: `/${runId}` },
            detail: { clusterId: cluster.id, jobId },
          });
        } catch (err) {
          // Cancelled while we were submitting: the cluster must not run it.
          if (!(err instanceof AppError && err.code === "conflict")) throw err;
          const now = await RunModel.findByPk(runId, { attributes: ["state"], transaction });
          if (now?.state === "cancelled") cancelLater.push(runId);
        }
      }
    });
  }
  out.submitted += accepted.size - held.size;
  out.reconciled += held.size;
  if (cancelLater.length > 0) {
    await adapter.cancel(cancelLater);
    out.cancelledOnCluster += cancelLater.length;
  }
}

async function failQuietly(runId: string, reason: "dispatch_failed", detail: string, log: Logger) {
  try {
    await failRun(runId, { reason, detail }, { cause: "broker.dispatch" });
  } catch (err) {
    log.error({ runId, err }, "could not record a dispatch failure");
  }
}

function chunks<T>(items: T[], size: number): T[][] {
  const out: T[][] = [];
  for (let i = 0; i < items.length; i += size) out.push(items.slice(i, i + size));
  return out;
}
