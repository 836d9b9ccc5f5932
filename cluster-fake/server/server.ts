import fs from "node:fs";
import type { AddressInfo } from "node:net";
import ssh2 from "ssh2";
import type { Connection, ServerChannel } from "ssh2";
import { resolveOptions, type FakeClusterOptions, type ResolvedOptions } from "./config.js";
import { authorizedKeysPath, findAuthorizedKey, loadOrCreateHostKey, readAuthorizedKeys } from "./keys.js";
import { StateStore } from "./state-store.js";
import { RunScheduler } from "./scheduler.js";
import { EXIT, parseCommandLine, readsStdin, runCommand } from "./protocol.js";
import { SftpJail } from "./sftp-jail.js";
import { serveSftp } from "./sftp-server.js";

/** Counters a test can read to prove what reached the node. */
export interface NodeStats {
  connections: number;
  authAccepted: number;
  authRejected: number;
  execs: number;
  sftpSessions: number;
  sftpOps: number;
}

/** A running fake login node. */
export interface FakeCluster {
  host: string;
  port: number;
  /** OpenSSH public key line of the host key (pin its fingerprint in the app). */
  hostPublicKey: string;
  options: ResolvedOptions;
  stats: NodeStats;
  scheduler: RunScheduler;
  /** Stop accepting, drop sessions, terminate running samplers (recorded as lost), persist. */
  close(): Promise<void>;
}

/** Start the fake login node: host key, state, scheduler, then the SSH listener. */
export async function startFakeCluster(options: FakeClusterOptions = {}): Promise<FakeCluster> {
  const opts = resolveOptions(options);
  const log = opts.logger;
  fs.mkdirSync(opts.workRoot, { recursive: true });
  const hostKey = loadOrCreateHostKey(opts.stateDir);
  const store = new StateStore(opts.stateDir);
  const lost = store.load(new Date());
  if (lost.length > 0) log.warn({ lost }, "runs that were running before the restart are now lost");
  const scheduler = new RunScheduler(opts, store);
  const jail = new SftpJail(opts.workRoot);
  const stats: NodeStats = { connections: 0, authAccepted: 0, authRejected: 0, execs: 0, sftpSessions: 0, sftpOps: 0 };
  const clients = new Set<Connection>();
  const startedAt = new Date();

  const server = new ssh2.Server({ hostKeys: [hostKey.privateKey], ident: "ergodex-cluster-fake" }, (client) => {
    stats.connections++;
    clients.add(client);
    let user = "";
    client.on("authentication", (ctx) => {
      // Re-read on every attempt so keys the seed writes take effect without a restart.
      const { keys } = readAuthorizedKeys(authorizedKeysPath(opts.stateDir));
      const key = ctx.method === "publickey" ? findAuthorizedKey(keys, ctx.key.algo, ctx.key.data) : null;
      const userOk = opts.user === null || ctx.username === opts.user;
      if (ctx.method !== "publickey" || !key || !userOk) {
        if (ctx.method !== "none") stats.authRejected++;
        return ctx.reject(["publickey"]);
      }
      // Without a signature the client only asks whether the key would do.
      if (!ctx.signature) return ctx.accept();
      if (key.verify(ctx.blob!, ctx.signature, ctx.hashAlgo) !== true) {
        stats.authRejected++;
        return ctx.reject(["publickey"]);
      }
      stats.authAccepted++;
      user = ctx.username;
      ctx.accept();
    });
    client.on("ready", () => {
      client.on("session", (acceptSession) => {
        const session = acceptSession();
        session.on("exec", (accept, _reject, info) => {
          stats.execs++;
          handleExec(accept(), info.command, user).catch((err: Error) => log.error({ err }, "exec failed"));
        });
        session.on("sftp", (accept) => {
          stats.sftpSessions++;
          serveSftp(accept(), jail, log, () => { stats.sftpOps++; });
        });
      });
    });
    client.on("error", (err) => log.debug({ err: err.message }, "client connection error"));
    client.on("close", () => clients.delete(client));
  });

  async function handleExec(channel: ServerChannel, command: string, user: string): Promise<void> {
    const argv = parseCommandLine(command);
    let stdin = "";
    if (readsStdin(argv)) {
      // Events, not for-await: the async iterator destroys the channel when it ends, losing the reply.
      stdin = await new Promise<string>((resolve, reject) => {
        const chunks: Buffer[] = [];
        channel.on("data", (c: Buffer) => chunks.push(c));
        channel.once("end", () => resolve(Buffer.concat(chunks).toString("utf8")));
        channel.once("error", reject);
      });
    }
    let reply;
    try {
      reply = await runCommand(argv, stdin, {
        scheduler, user, nodeName: opts.nodeName, startedAt, slots: opts.slots,
      });
    } catch (err) {
      log.error({ err, command }, "command failed");
      reply = { code: EXIT.internal, body: { error: { code: "internal", message: (err as Error).message } },
        stderr: (err as Error).message };
    }
    log.info({ user, command: argv.slice(0, 2).join(" "), code: reply.code }, "exec");
    channel.write(`${JSON.stringify(reply.body)}\n`);
    if (reply.stderr) channel.stderr.write(`${reply.stderr}\n`);
    channel.exit(reply.code);
    channel.end();
  }

  await new Promise<void>((resolve, reject) => {
    server.once("error", reject);
    server.listen(opts.port, opts.host, () => {
      server.off("error", reject);
      resolve();
    });
  });
  scheduler.resume();
  const port = (server.address() as AddressInfo).port;
  log.info({ host: opts.host, port, stateDir: opts.stateDir }, "fake cluster listening");

  let closing: Promise<void> | null = null;
  return {
    host: opts.host, port, hostPublicKey: hostKey.publicKey, options: opts, stats, scheduler,
    close() {
      closing ??= (async () => {
        const stopped = new Promise<void>((r) => server.close(() => r()));
        for (const c of clients) c.end();
        await scheduler.shutdown();
        await stopped;
      })();
      return closing;
    },
  };
}
