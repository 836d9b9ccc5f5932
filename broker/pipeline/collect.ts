// Collect: fetch a finished run's bundle over SFTP into a temp dir, import it (archive,
// validate, COPY, run estimates: one transaction in the importer), then done + settle +
// point/ensemble completion in one transaction. Safe to repeat: a run that is no longer
// collecting is left alone, and re-importing the same bundle is a no-op.
import fs from "node:fs";
import path from "node:path";
import crypto from "node:crypto";
import type { Logger } from "pino";
import { db } from "@/models";
import { env } from "@/lib/env";
import { AppError } from "@/lib/errors";
import { adapterFor } from "@/lib/clusters/adapter-for";
import { importBundle } from "@/lib/importer/import-bundle";
import { transitionRun } from "@/lib/runs/transition-run";
import { failRun } from "@/lib/runs/fail-run";
import { settleRun } from "@/lib/allocations/settle-run";
import { afterRunFinal, lockEnsemble } from "@/lib/runs/after-run-final";
import { withLock } from "./locks";

/** What collecting one run came to. */
export type CollectOutcome = "done" | "rejected" | "not-collecting" | "busy";

/** Collect run `runId`; transient faults (connection) throw so the job is retried. */
export async function collectRun(runId: string, log: Logger): Promise<CollectOutcome> {
  const locked = await withLock(`collect:${runId}`, () => collectLocked(runId, log), { wait: false });
  return locked.ran ? locked.value : "busy";
}

async function collectLocked(runId: string, log: Logger): Promise<CollectOutcome> {
  const { Run, Ensemble, Cluster } = db();
  const run = await Run.findByPk(runId);
  if (!run) throw new AppError("not_found", `run ${runId} does not exist`);
  if (run.state !== "collecting") return "not-collecting";
  const ensemble = await Ensemble.findByPk(run.ensembleId);
  const cluster = ensemble?.clusterId ? await Cluster.findByPk(ensemble.clusterId) : null;
  if (!cluster) throw new AppError("not_found", `run ${runId} has no cluster to collect from`);

  const dir = path.join(env.dataDir, "tmp", `collect-${runId}-${crypto.randomBytes(4).toString("hex")}`);
  fs.mkdirSync(dir, { recursive: true });
  try {
    await adapterFor(cluster).fetch(runId, dir);
    let manifest: { sampler?: { commit?: string }; host?: string } = {};
    try {
      manifest = JSON.parse(fs.readFileSync(path.join(dir, "manifest.json"), "utf8"));
    } catch { /* the importer says what is wrong with it */ }
    try {
      const result = await importBundle({ runId, dir, source: "cluster" });
      log.info({ runId, status: result.status, rows: result.rows }, "bundle imported");
    } catch (err) {
      // "invalid": the bundle is bad; "conflict": the run already has another accepted bundle, or this bundle
      // belongs to another run. Neither gets better by retrying, so the run fails with the importer's reason.
      if (!(err instanceof AppError && (err.code === "invalid" || err.code === "conflict"))) throw err;
      await failRun(runId, { reason: "import_rejected", detail: err.message }, { cause: "collect.import_rejected" });
      return "rejected";
    }
    await db().sequelize.transaction(async (transaction) => {
      await lockEnsemble(run.ensembleId, transaction);
      const { run: done } = await transitionRun(runId, "done", {
        cause: "collect.imported", transaction,
        patch: { samplerCommit: manifest.sampler?.commit ?? null, host: manifest.host ?? null },
      });
      await settleRun(runId, { transaction });
      await afterRunFinal(done, { transaction });
    });
    return "done";
  } finally {
    fs.rmSync(dir, { recursive: true, force: true });
  }
}
