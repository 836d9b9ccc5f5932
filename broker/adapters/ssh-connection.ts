import ssh2 from "ssh2";
import type { Client, ClientChannel, SFTPWrapper } from "ssh2";
import pino, { type Logger } from "pino";
import { fingerprintOfBlob, parsePinnedFingerprint } from "./host-key-fingerprint";
import {
  ClusterAuthError, ClusterError, ClusterProtocolError, ClusterUnreachableError, ExecTimeoutError, HostKeyMismatchError,
} from "./errors";

/** Where and how to reach one cluster's login node. */
export interface SshConnectionOptions {
  host: string;
  port: number;
  username: string;
  /** OpenSSH private key; kept in memory only, never logged. */
  privateKey: string | Buffer;
  /** "SHA256:…" as `ssh-keygen -l` prints it. */
  hostKeyFingerprint: string;
  keepaliveIntervalMs?: number;
  keepaliveCountMax?: number;
  readyTimeoutMs?: number;
  execTimeoutMs?: number;
  reconnect?: { initialDelayMs?: number; maxDelayMs?: number; maxAttempts?: number };
  logger?: Logger;
}

/** Output of one remote command. */
export interface ExecResult {
  code: number | null;
  signal: string | null;
  stdout: string;
  stderr: string;
}

/** Round-trip accounting for benchmarks: every exec and every SFTP call counts once. */
export interface ConnectionStats {
  connects: number;
  /** Connection attempts that failed and were retried (or given up). */
  failedConnects: number;
  execCalls: number;
  /** Logical SFTP calls (a fastGet counts once, though it pipelines several requests). */
  sftpOps: number;
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

/** A connection that went away under an operation; safe to retry an idempotent one. */
class DroppedError extends ClusterError {
  constructor(cause: unknown) {
    super(`connection dropped: ${(cause as Error)?.message ?? cause}`, "dropped", true, { cause });
  }
}

/**
 * One SSH connection per cluster, opened lazily, reused by every call, reopened with
 * exponential backoff when it drops. The host key is checked against the pinned
 * fingerprint before authentication, so on a mismatch nothing is sent.
 */
export class SshConnection {
  readonly stats: ConnectionStats = { connects: 0, failedConnects: 0, execCalls: 0, sftpOps: 0 };
  private readonly pinned: string;
  private readonly log: Logger;
  private client: Client | null = null;
  private connecting: Promise<Client> | null = null;
  private sftpSession: Promise<SFTPWrapper> | null = null;
  private closed = false;

  constructor(private readonly opts: SshConnectionOptions) {
    this.pinned = parsePinnedFingerprint(opts.hostKeyFingerprint);
    const parsed = ssh2.utils.parseKey(opts.privateKey);
    if (parsed instanceof Error || !(Array.isArray(parsed) ? parsed[0] : parsed).isPrivateKey()) {
      // Say what is wrong without echoing any of the key.
      throw new ClusterError(`private key for ${opts.host} is not an unencrypted OpenSSH private key`, "bad_private_key", false);
    }
    this.log = (opts.logger ?? pino({ level: "silent" })).child({ cluster: `${opts.host}:${opts.port}` });
  }

  /** exec calls + SFTP calls since construction. */
  get roundTrips(): number {
    return this.stats.execCalls + this.stats.sftpOps;
  }

  private async getClient(): Promise<Client> {
    if (this.closed) throw new ClusterError("connection was closed by its owner", "closed", false);
    if (this.client) return this.client;
    this.connecting ??= this.connectWithBackoff().finally(() => { this.connecting = null; });
    return this.connecting;
  }

  private async connectWithBackoff(): Promise<Client> {
    const r = this.opts.reconnect ?? {};
    const attempts = r.maxAttempts ?? 6;
    let last: unknown;
    for (let i = 0; i < attempts; i++) {
      if (i > 0) await sleep(Math.min((r.initialDelayMs ?? 250) * 2 ** (i - 1), r.maxDelayMs ?? 10_000));
      try {
        return await this.connectOnce();
      } catch (err) {
        if (err instanceof HostKeyMismatchError || err instanceof ClusterAuthError) throw err;
        last = err;
        this.stats.failedConnects++;
        this.log.warn({ attempt: i + 1, err: (err as Error).message }, "ssh connect failed");
      }
    }
    throw new ClusterUnreachableError(`${this.opts.host}:${this.opts.port}`, attempts, last);
  }

  private connectOnce(): Promise<Client> {
    return new Promise((resolve, reject) => {
      const c = new ssh2.Client();
      let mismatch: HostKeyMismatchError | null = null;
      let settled = false;
      const fail = (err: Error) => {
        if (settled) return;
        settled = true;
        c.end();
        reject(err);
      };
      c.once("ready", () => {
        settled = true;
        this.client = c;
        this.stats.connects++;
        this.log.info("ssh connected");
        resolve(c);
      });
      c.on("error", (err: Error & { level?: string }) => {
        if (settled) return void this.log.warn({ err: err.message }, "ssh connection error");
        fail(mismatch ?? (err.level === "client-authentication" ? new ClusterAuthError(this.opts.host, err) : err));
      });
      c.on("close", () => {
        if (this.client === c) {
          this.client = null;
          this.sftpSession = null;
          this.log.info("ssh connection closed");
        }
        fail(mismatch ?? new Error("connection closed during the handshake"));
      });
      c.connect({
        host: this.opts.host,
        port: this.opts.port,
        username: this.opts.username,
        privateKey: this.opts.privateKey,
        readyTimeout: this.opts.readyTimeoutMs ?? 10_000,
        keepaliveInterval: this.opts.keepaliveIntervalMs ?? 15_000,
        keepaliveCountMax: this.opts.keepaliveCountMax ?? 3,
        hostVerifier: (key: Buffer) => {
          const actual = fingerprintOfBlob(key);
          if (actual === this.pinned) return true;
          mismatch = new HostKeyMismatchError(`${this.opts.host}:${this.opts.port}`, this.pinned, actual);
          this.log.error({ expected: this.pinned, actual }, "host key mismatch");
          return false;
        },
      });
    });
  }

  /**
   * Run fn on a live client. If the connection turns out to have dropped under it, reconnect
   * and run it once more — only when the caller says the operation is idempotent.
   */
  private async withClient<T>(idempotent: boolean, fn: (c: Client) => Promise<T>): Promise<T> {
    const client = await this.getClient();
    try {
      return await fn(client);
    } catch (err) {
      await new Promise((r) => setImmediate(r)); // let a pending 'close' land first
      const dropped = err instanceof DroppedError || this.client !== client;
      if (!dropped) throw err;
      if (this.client === client) {
        this.client = null;
        this.sftpSession = null;
        client.end();
      }
      if (!idempotent) throw err instanceof DroppedError ? err : new DroppedError(err);
      this.log.info({ err: (err as Error).message }, "connection dropped; retrying on a new one");
      return fn(await this.getClient());
    }
  }

  /** Run a command; stdin (if given) is sent and closed. */
  exec(command: string, o: { stdin?: string; timeoutMs?: number; idempotent?: boolean } = {}): Promise<ExecResult> {
    const ms = o.timeoutMs ?? this.opts.execTimeoutMs ?? 30_000;
    return this.withClient(o.idempotent ?? false, (client) => new Promise<ExecResult>((resolve, reject) => {
      this.stats.execCalls++;
      client.exec(command, (err: Error | undefined, stream: ClientChannel) => {
        if (err) return reject(new DroppedError(err));
        const out: Buffer[] = [];
        const errOut: Buffer[] = [];
        let code: number | null = null;
        let signal: string | null = null;
        let exited = false;
        const timer = setTimeout(() => {
          stream.close();
          reject(new ExecTimeoutError(command, ms));
        }, ms);
        stream.on("data", (d: Buffer) => out.push(d));
        stream.stderr.on("data", (d: Buffer) => errOut.push(d));
        stream.on("exit", (c: number | null, s?: string) => {
          exited = true;
          code = c;
          signal = s ?? null;
        });
        stream.on("close", () => {
          clearTimeout(timer);
          if (!exited) return reject(new DroppedError(new Error(`channel of "${command}" closed without an exit status`)));
          resolve({ code, signal, stdout: Buffer.concat(out).toString("utf8"), stderr: Buffer.concat(errOut).toString("utf8") });
        });
        stream.end(o.stdin);
      });
    }));
  }

  /** Run a command that answers one JSON document; a non-zero exit becomes ClusterProtocolError. */
  async execJson<T>(command: string, o: { stdin?: string; timeoutMs?: number; idempotent?: boolean } = {}): Promise<T> {
    const r = await this.exec(command, o);
    let body: unknown;
    try {
      body = JSON.parse(r.stdout);
    } catch {
      throw new ClusterProtocolError(`"${command}" exited ${r.code} without JSON on stdout: ${(r.stderr || r.stdout).trim().slice(0, 300)}`, r.code);
    }
    if (r.code !== 0) {
      const msg = (body as { error?: { message?: string } })?.error?.message ?? r.stderr.trim();
      throw new ClusterProtocolError(`"${command}" failed with exit ${r.code}: ${msg}`, r.code);
    }
    return body as T;
  }

  private getSftp(client: Client): Promise<SFTPWrapper> {
    this.sftpSession ??= new Promise<SFTPWrapper>((resolve, reject) => {
      client.sftp((err, sftp) => {
        if (err) {
          this.sftpSession = null;
          return reject(new DroppedError(err));
        }
        sftp.on("close", () => { this.sftpSession = null; });
        resolve(sftp);
      });
    });
    return this.sftpSession;
  }

  /** One SFTP call on the shared session, callback style wrapped into a promise. */
  sftp<T>(fn: (sftp: SFTPWrapper, cb: (err: Error | null | undefined, value?: T) => void) => void, idempotent = true): Promise<T> {
    return this.withClient(idempotent, async (client) => {
      const sftp = await this.getSftp(client);
      this.stats.sftpOps++;
      return new Promise<T>((resolve, reject) => fn(sftp, (err, value) => (err ? reject(err) : resolve(value as T))));
    });
  }

  /** Close the connection for good. */
  async close(): Promise<void> {
    this.closed = true;
    const c = this.client;
    this.client = null;
    this.sftpSession = null;
    // Bounded wait: a client whose socket is already gone never emits another 'close'.
    if (c) await Promise.race([new Promise<void>((r) => { c.once("close", () => r()); c.end(); }), sleep(1000)]);
  }
}
