// The broker process: pg-boss workers for every job in the registry, a poll-clusters job queued
// every ERGODEX_POLL_SECONDS, a health check on 127.0.0.1:ERGODEX_BROKER_PORT, and a graceful
// stop on SIGTERM/SIGINT (jobs in hand get ERGODEX_SHUTDOWN_SECONDS to finish; pg-boss hands
// back what is still running, to be retried).
import http from "node:http";
import { QueryTypes } from "sequelize";
import { env } from "@/lib/env";
import { log as rootLog } from "@/lib/log";
import { getSequelize } from "@/lib/db/sequelize";
import { BOSS_SCHEMA, startBoss, stopBoss } from "@/lib/queue/boss";
import { enqueue } from "@/lib/queue/enqueue";
import { closeAdapters } from "@/lib/clusters/adapter-for";
import { db } from "@/models";
import { JOBS } from "./registry";
import { startWorkers } from "./jobs/run-job";
import { requeueStaleCollections } from "./pipeline/cycle";

const log = rootLog.child({ process: "broker" });
let state: "starting" | "running" | "stopping" = "starting";
let pollTimer: NodeJS.Timeout | undefined;

async function health(): Promise<{ status: string; queues: Record<string, Record<string, number>>; clusters: unknown[] }> {
  const rows = await getSequelize().query<{ name: string; state: string; n: string }>(
    `SELECT name, state::text AS state, count(*) AS n FROM ${BOSS_SCHEMA}.job WHERE state < 'completed' GROUP BY name, state`, { type: QueryTypes.SELECT });
  const queues: Record<string, Record<string, number>> = Object.fromEntries(JOBS.map((j) => [j.name, {}]));
  for (const r of rows) (queues[r.name] ??= {})[r.state] = Number(r.n);
  const clusters = (await db().Cluster.findAll({ order: [["name", "ASC"]] })).map((c) => ({
    name: c.name, active: c.active, healthy: c.healthy, healthNote: c.healthNote, lastContactAt: c.lastContactAt,
  }));
  const status = state !== "running" ? state : clusters.every((c) => !c.active || c.healthy) ? "ok" : "degraded";
  return { status, queues, clusters };
}

function serveHealth(): http.Server {
  const server = http.createServer((req, res) => {
    if (req.method !== "GET" || req.url !== "/health") {
      res.writeHead(404, { "content-type": "application/json" }).end(JSON.stringify({ error: "GET /health only" }));
      return;
    }
    health().then(
      (body) => res.writeHead(body.status === "ok" || body.status === "degraded" ? 200 : 503, { "content-type": "application/json" }).end(JSON.stringify(body)),
      (err) => res.writeHead(503, { "content-type": "application/json" }).end(JSON.stringify({ status: "error", error: (err as Error).message })),
    );
  });
  server.listen(env.broker.healthPort, "127.0.0.1");
  return server;
}

async function main() {
  const server = serveHealth();
  const boss = await startBoss({ worker: true });
  const pollingIntervalSeconds = Math.max(0.5, Math.min(2, env.broker.pollSeconds / 2));
  for (const job of JOBS) await startWorkers(boss, job, log, pollingIntervalSeconds);
  // Collections a killed broker left in hand are queued again now, not after the stale timeout.
  const requeued = await requeueStaleCollections(0);
  const tick = () => void enqueue("poll-clusters", {}, { singletonKey: "cycle" }).catch((err) => log.error({ err }, "could not queue a poll"));
  tick();
  pollTimer = setInterval(tick, env.broker.pollSeconds * 1000);
  state = "running";
  log.info({ port: env.broker.healthPort, database: env.pg.database, jobs: JOBS.map((j) => j.name), requeued }, "broker ready");
  console.log(`broker ready 127.0.0.1:${env.broker.healthPort}`);

  let stopping = false;
  const stop = async (signal: string) => {
    if (stopping) return;
    stopping = true;
    state = "stopping";
    log.info({ signal }, "broker stopping");
    clearInterval(pollTimer);
    try {
      await stopBoss({ graceful: true, timeoutMs: env.broker.shutdownSeconds * 1000 });
      await closeAdapters();
      await getSequelize().close();
    } catch (err) {
      log.error({ err }, "unclean stop");
    }
    server.close();
    log.info("broker stopped");
    process.exit(0);
  };
  process.on("SIGTERM", () => void stop("SIGTERM"));
  process.on("SIGINT", () => void stop("SIGINT"));
}

main().catch((err) => {
  log.fatal({ err }, "broker failed to start");
  process.exit(1);
});
