import { posix } from "node:path";
import { SshConnection, type SshConnectionOptions } from "./ssh-connection";
import { downloadDir, ensureRemoteDir, mapLimit } from "./sftp-files";
import { ClusterError } from "./errors";
import { NODE_COMMAND, checkReport, checkSubmit, toRunStatus, unknownStatus } from "./node-protocol";
import type {
  ClusterAdapter, ClusterHealth, FetchedFile, RunStatus, StageRequest, SubmitRequest, SubmitResult,
} from "./types";

export { sshKeyFingerprint } from "./host-key-fingerprint";

/** Connection settings plus where runs live on the cluster. */
export interface FakeClusterAdapterOptions extends SshConnectionOptions {
  /** Remote directory holding one folder per run; "/" on the fake node (its SFTP root). */
  workDir?: string;
}

const ID = /^[A-Za-z0-9][A-Za-z0-9._-]{0,127}$/;
const TOKEN = /^[A-Za-z0-9][A-Za-z0-9._:-]{0,127}$/;
/** Run ids per report/cancel command line; keeps one exec request well under SSH packet limits. */
const IDS_PER_CALL = 400;
/** Runs per submit request; the node accepts up to 10 000, stdin has no packet limit. */
const RUNS_PER_SUBMIT = 2000;

function checkId(runId: string, where: string): void {
  if (!ID.test(runId)) throw new ClusterError(`${where}: invalid run id "${runId}" (expected ${ID.source})`, "bad_request", false);
}

function chunks<T>(items: T[], size: number): T[][] {
  const out: T[][] = [];
  for (let i = 0; i < items.length; i += size) out.push(items.slice(i, i + size));
  return out;
}

/**
 * ClusterAdapter for a login node that speaks the `ergodex-node` protocol over SSH: the
 * loopback fake cluster. Every protocol command is idempotent, so a call that loses its
 * connection is retried once on a fresh one.
 */
export class FakeClusterAdapter implements ClusterAdapter {
  readonly connection: SshConnection;
  private readonly workDir: string;

  constructor(opts: FakeClusterAdapterOptions) {
    this.connection = new SshConnection(opts);
    this.workDir = opts.workDir ?? "/";
  }

  private runDir(runId: string): string {
    return posix.join(this.workDir, runId);
  }

  async stage(runs: StageRequest[]): Promise<void> {
    for (const r of runs) {
      checkId(r.runId, "stage");
      if (r.runJson?.runId !== r.runId) {
        throw new ClusterError(`stage: run.json of ${r.runId} carries runId ${String(r.runJson?.runId)}`, "bad_request", false);
      }
    }
    await mapLimit(runs, 8, async (r) => {
      await ensureRemoteDir(this.connection, this.runDir(r.runId));
      const body = `${JSON.stringify(r.runJson, null, 2)}\n`;
      await this.connection.sftp<void>((s, cb) => s.writeFile(posix.join(this.runDir(r.runId), "run.json"), body, cb));
    });
  }

  async submit(runs: SubmitRequest[]): Promise<SubmitResult[]> {
    if (runs.length === 0) return [];
    for (const r of runs) {
      checkId(r.runId, "submit");
      if (!TOKEN.test(r.dispatchToken)) {
        throw new ClusterError(`submit: run ${r.runId} has an invalid dispatch token`, "bad_request", false);
      }
    }
    const out: SubmitResult[] = [];
    for (const batch of chunks(runs, RUNS_PER_SUBMIT)) {
      const stdin = JSON.stringify({
        runs: batch.map((r) => ({
          runId: r.runId, token: r.dispatchToken,
          wallSeconds: r.resources.wallSeconds, cores: r.resources.cores, memoryMb: r.resources.memoryMb,
        })),
      });
      const body = checkSubmit(await this.connection.execJson(`${NODE_COMMAND} submit`, { stdin, idempotent: true }));
      out.push(...body.results.map((x): SubmitResult => (x.ok
        ? { runId: x.runId, accepted: true, jobId: x.run.jobId, alreadySubmitted: !x.created, state: x.run.state }
        : { runId: x.runId, accepted: false, error: x.error })));
    }
    return out;
  }

  async status(runIds?: string[]): Promise<RunStatus[]> {
    if (runIds === undefined) {
      const body = checkReport(await this.connection.execJson(`${NODE_COMMAND} report --active`, { idempotent: true }));
      return body.runs.map(toRunStatus);
    }
    runIds.forEach((id) => checkId(id, "status"));
    const out: RunStatus[] = [];
    for (const ids of chunks(runIds, IDS_PER_CALL)) {
      const body = checkReport(await this.connection.execJson(`${NODE_COMMAND} report ${ids.join(" ")}`, { idempotent: true }));
      const byId = new Map(body.runs.map((r) => [r.runId, r]));
      for (const id of ids) {
        const rec = byId.get(id);
        out.push(rec ? toRunStatus(rec) : unknownStatus(id));
      }
    }
    return out;
  }

  async fetch(runId: string, localDir: string): Promise<FetchedFile[]> {
    checkId(runId, "fetch");
    return downloadDir(this.connection, posix.join(this.runDir(runId), "out"), localDir);
  }

  async cancel(runIds: string[]): Promise<RunStatus[]> {
    runIds.forEach((id) => checkId(id, "cancel"));
    const out: RunStatus[] = [];
    for (const ids of chunks(runIds, IDS_PER_CALL)) {
      const body = checkReport(await this.connection.execJson(`${NODE_COMMAND} cancel ${ids.join(" ")}`, { idempotent: true }));
      const byId = new Map(body.runs.map((r) => [r.runId, r]));
      for (const id of ids) out.push(byId.has(id) ? toRunStatus(byId.get(id)!) : unknownStatus(id));
    }
    return out;
  }

  async health(): Promise<ClusterHealth> {
    const h = await this.connection.execJson<ClusterHealth>(`${NODE_COMMAND} health`, { idempotent: true });
    if (typeof h?.ok !== "boolean" || typeof h.slots !== "number") {
      throw new ClusterError("unexpected health reply from the node", "protocol", false);
    }
    return { ok: h.ok, node: h.node, protocol: h.protocol, slots: h.slots, running: h.running, queued: h.queued };
  }

  close(): Promise<void> {
    return this.connection.close();
  }
}
