/**
 * Stand-alone fake login node: `tsx cluster-fake/index.ts`. Configured from ERGODEX_CLUSTER_*
 * variables (see docs/fake-cluster.md); prints one ready line when it accepts connections.
 */
import pino from "pino";
import { optionsFromEnv } from "./server/config.js";
import { startFakeCluster } from "./server/server.js";
import { sshKeyFingerprint } from "../broker/adapters/host-key-fingerprint.js";

const logger = pino({ level: process.env.LOG_LEVEL ?? "info", base: { component: "cluster-fake" } });

// If whoever reads our stdout goes away, keep running rather than die on EPIPE.
process.stdout.on("error", () => {});

async function main(): Promise<void> {
  const cluster = await startFakeCluster({ ...optionsFromEnv(process.env), logger });
  // The ready line is plain text so start scripts can wait for it with grep.
  process.stdout.write(`cluster-fake ready ${cluster.host}:${cluster.port} ${sshKeyFingerprint(cluster.hostPublicKey)}\n`);
  let stopping = false;
  const stop = (signal: string) => {
    if (stopping) return;
    stopping = true;
    logger.info({ signal }, "stopping: terminating running samplers");
    // A stop that cannot finish (say a wedged socket) must not keep the port forever.
    setTimeout(() => process.exit(1), cluster.options.killGraceMs + 5000).unref();
    cluster.close().then(
      () => { logger.info("stopped"); process.exit(0); },
      (err: unknown) => { logger.error({ err }, "stop failed"); process.exit(1); },
    );
  };
  process.on("SIGTERM", () => stop("SIGTERM"));
  process.on("SIGINT", () => stop("SIGINT"));
}

main().catch((err: unknown) => {
  logger.fatal({ err }, "cluster-fake failed to start");
  process.exit(1);
});
