import { posix } from "node:path";
import { SshConnection, type SshConnectionOptions } from "./ssh-connection";
import { downloadDir, ensureRemoteDir, mapLimit } from "./sftp-files";
import { ClusterError, ClusterProtocolError } from "./errors";
import { mapSchedulerState } from "./batch-status";
import { inspectCommand, inspectInput, parseInspect, type RunFolderInfo } from "./batch-inspect";
import { IntervalGate, SchedulerListing, type SchedulerCallStats } from "./batch-listing";
import { composeRunStatus } from "./batch-run-status";
import {
  ARRAYS_DIR, SAFE_PATH, groupDirOf, groupIdOf, renderBatchScript, renderTasks, wallMinutes, type ArrayTask,
} from "./batch-script";
import type {
  ClusterAdapter, ClusterHealth, FetchedFile, RunStatus, StageRequest, SubmitRequest, SubmitResult,
} from "./types";

/** A login node of a batch-scheduled cluster, and how Ergodex behaves on it. */
export interface BatchAdapterOptions extends SshConnectionOptions {
  /** Remote folder with one folder per run: absolute, or relative to the login home. */
  workRoot: string;
  /** Starts a built-in sampler: `<samplerCommand> <name> <run.json> <outdir>`. */
  samplerCommand: string;
  partition?: string | null;
  account?: string | null;
  /** Shell lines run in every task before the sampler (module loads, environment). */
  prelude?: string | null;
  /** Least time between two job listings; default 60 s, as sites ask of their users. */
  queryIntervalMs?: number;
  /** Least time between two submissions (sbatch calls); default 5 s. */
  submitIntervalMs?: number;
  /** Most runs in one job array; default 1000 (the scheduler's usual MaxArraySize is 1001). */
  maxArraySize?: number;
  /** Seconds before the time limit at which the sampler gets SIGTERM to checkpoint; default 90. */
  wallSignalSeconds?: number;
}

const ID = /^[A-Za-z0-9][A-Za-z0-9._-]{0,127}$/;
const TOKEN = /^[A-Za-z0-9][A-Za-z0-9._:-]{0,127}$/;
const USER = /^[a-z_][a-z0-9_.-]{0,31}$/;
const IDS_PER_CALL = 400;
const ACTIVE = new Set(["queued", "running"]);

function check(cond: boolean, msg: string): void {
  if (!cond) throw new ClusterError(msg, "bad_request", false);
}

function chunks<T>(items: T[], size: number): T[][] {
  const out: T[][] = [];
  for (let i = 0; i < items.length; i += size) out.push(items.slice(i, i + size));
  return out;
}

/**
 * ClusterAdapter for a batch scheduler reached over SSH (OpenSSH login node, host key pinned).
 * Runs are staged over SFTP, submitted as job arrays, watched through one job listing per
 * query interval, fetched over SFTP and cancelled through the scheduler. Job names carry a
 * group id derived from the runs' dispatch tokens, so after a crash nothing is submitted twice.
 */
export class BatchSchedulerAdapter implements ClusterAdapter {
  readonly connection: SshConnection;
  readonly schedulerCalls: SchedulerCallStats = { squeue: 0, sbatch: 0, scancel: 0, sinfo: 0 };
  private readonly listing: SchedulerListing;
  private readonly submitGate: IntervalGate;
  private readonly samplerOf = new Map<string, string>();
  /** Runs this instance submitted, until the listing shows them. */
  private readonly submitted = new Map<string, { token: string; jobId: string; at: string; groupId: string; index: number }>();
  /** Tasks this instance cancelled (run id → job id), reported cancelled while still winding down. */
  private readonly cancelled = new Map<string, string>();
  private root: Promise<string> | null = null;

  constructor(private readonly opts: BatchAdapterOptions) {
    check(USER.test(opts.username), `cluster user "${opts.username}" is not a plain user name`);
    check(opts.samplerCommand.trim() !== "" && !/[\n\r]/.test(opts.samplerCommand), "sampler command must be one non-empty line");
    for (const [k, v] of [["partition", opts.partition], ["account", opts.account]] as const) {
      check(v == null || /^[A-Za-z0-9_.-]+$/.test(v), `${k} "${v}" may only hold letters, digits and _.-`);
    }
    this.connection = new SshConnection(opts);
    const interval = opts.queryIntervalMs ?? 60_000;
    this.listing = new SchedulerListing(this.connection, async () => opts.username, () => this.workRoot(), interval, this.schedulerCalls);
    this.submitGate = new IntervalGate(opts.submitIntervalMs ?? 5_000);
  }

  /** The absolute work root; a relative one is resolved against the login home once (SFTP realpath). */
  workRoot(): Promise<string> {
    this.root ??= (async () => {
      const w = this.opts.workRoot.replace(/\/+$/, "");
      const abs = w.startsWith("/") ? w : posix.join(await this.connection.sftp<string>((s, cb) => s.realpath(".", cb)), w);
      check(SAFE_PATH.test(abs), `work root ${abs} must be an absolute path of letters, digits and ._/+-`);
      return abs;
    })().catch((e) => { this.root = null; throw e; });
    return this.root;
  }

  async stage(runs: StageRequest[]): Promise<void> {
    for (const r of runs) {
      check(ID.test(r.runId), `stage: invalid run id "${r.runId}"`);
      check(r.runJson?.runId === r.runId, `stage: run.json of ${r.runId} carries runId ${String(r.runJson?.runId)}`);
      const name = (r.runJson.sampler as { name?: unknown } | undefined)?.name;
      check(typeof name === "string", `stage: run.json of ${r.runId} has no sampler.name`);
    }
    const root = await this.workRoot();
    await ensureRemoteDir(this.connection, root);
    await mapLimit(runs, 8, async (r) => {
      await ensureRemoteDir(this.connection, posix.join(root, r.runId));
      const body = `${JSON.stringify(r.runJson, null, 2)}\n`;
      await this.connection.sftp<void>((s, cb) => s.writeFile(posix.join(root, r.runId, "run.json"), body, cb));
      this.samplerOf.set(r.runId, (r.runJson.sampler as { name: string }).name);
    });
  }

  async submit(runs: SubmitRequest[]): Promise<SubmitResult[]> {
    if (runs.length === 0) return [];
    const seen = new Set<string>();
    for (const r of runs) {
      check(ID.test(r.runId), `submit: invalid run id "${r.runId}"`);
      check(TOKEN.test(r.dispatchToken), `submit: run ${r.runId} has an invalid dispatch token`);
      check(!seen.has(r.runId), `submit: run ${r.runId} appears twice in one batch`);
      seen.add(r.runId);
      wallMinutes(r.resources.wallSeconds);
    }
    const view = await this.listing.view(await this.listing.get());
    const results = new Map<string, SubmitResult>();
    const fresh: SubmitRequest[] = [];
    for (const r of runs) {
      const v = view.get(r.runId);
      const mine = this.submitted.get(r.runId);
      if (v && v.task.token === r.dispatchToken) {
        results.set(r.runId, { runId: r.runId, accepted: true, jobId: v.row.jobId, alreadySubmitted: true, state: mapSchedulerState(v.row).state });
      } else if (mine?.token === r.dispatchToken) {
        results.set(r.runId, { runId: r.runId, accepted: true, jobId: mine.jobId, alreadySubmitted: true, state: "queued" });
      } else if ((v && ACTIVE.has(mapSchedulerState(v.row).state)) || (mine && !v)) {
        results.set(r.runId, { runId: r.runId, accepted: false, error: { code: "conflict", message: `run ${r.runId} is still queued or running under another dispatch token` } });
      } else fresh.push(r);
    }
    // Tasks the scheduler has already forgotten (older than its MinJobAge) left markers in the run folder.
    const folders = fresh.length ? await this.inspect(fresh.map((r) => ({ runId: r.runId, errFile: null }))) : new Map<string, RunFolderInfo>();
    const todo = fresh.filter((r) => {
      const t = folders.get(r.runId)?.tokens.get(r.dispatchToken);
      if (!t) return true;
      results.set(r.runId, { runId: r.runId, accepted: true, jobId: t.jobId, alreadySubmitted: true, state: t.exitCode === null ? "lost" : "exited" });
      return false;
    });
    const byResources = new Map<string, SubmitRequest[]>();
    for (const r of todo) {
      const key = `${r.resources.cores}/${r.resources.memoryMb}/${wallMinutes(r.resources.wallSeconds)}`;
      byResources.set(key, [...(byResources.get(key) ?? []), r]);
    }
    for (const group of [...byResources.values()].flatMap((g) => chunks(g, this.opts.maxArraySize ?? 1000))) {
      for (const res of await this.submitArray(group)) results.set(res.runId, res);
    }
    return runs.map((r) => results.get(r.runId)!);
  }

  /** Write one array's task map and script, then submit it with one sbatch. */
  private async submitArray(runs: SubmitRequest[]): Promise<SubmitResult[]> {
    const root = await this.workRoot();
    const names = await mapLimit(runs, 8, (r) => this.samplerName(root, r.runId));
    const refused = runs.filter((_, i) => names[i] === null);
    const ok = runs.filter((_, i) => names[i] !== null);
    const out: SubmitResult[] = refused.map((r) => ({ runId: r.runId, accepted: false, error: { code: "not_staged", message: `no readable run.json with sampler.name for ${r.runId} under ${root}` } }));
    if (ok.length === 0) return out;
    const okNames = names.filter((n): n is string => n !== null);
    const tasks: ArrayTask[] = ok.map((r, index) => ({ index, runId: r.runId, token: r.dispatchToken, sampler: okNames[index] }));
    const groupId = groupIdOf(tasks);
    const dir = groupDirOf(root, groupId);
    const script = renderBatchScript(groupId, tasks, ok[0].resources, {
      workRoot: root, partition: this.opts.partition, account: this.opts.account, prelude: this.opts.prelude,
      samplerCommand: this.opts.samplerCommand, wallSignalSeconds: this.opts.wallSignalSeconds ?? 90,
    });
    await ensureRemoteDir(this.connection, posix.join(root, ARRAYS_DIR));
    await ensureRemoteDir(this.connection, dir);
    await this.connection.sftp<void>((s, cb) => s.writeFile(`${dir}/tasks.tsv`, renderTasks(tasks), cb));
    await this.connection.sftp<void>((s, cb) => s.writeFile(`${dir}/job.sh`, script, cb));
    this.listing.learnGroup(groupId, tasks);
    await this.submitGate.pass();
    // Not retried on a dropped connection: the next submit finds the array by its job name instead.
    const r = await this.connection.exec(`sbatch --parsable ${dir}/job.sh`, { idempotent: false });
    this.schedulerCalls.sbatch++;
    const m = /^(\d+)(;\S+)?\s*$/.exec(r.stdout);
    if (r.code !== 0 || !m) {
      const message = `sbatch refused the array for ${ok.length} runs (exit ${r.code}): ${(r.stderr || r.stdout).trim().slice(0, 300)}`;
      return [...out, ...ok.map((x) => ({ runId: x.runId, accepted: false as const, error: { code: "submit_failed", message } }))];
    }
    const at = new Date().toISOString();
    for (const t of tasks) this.submitted.set(t.runId, { token: t.token, jobId: `${m[1]}_${t.index}`, at, groupId, index: t.index });
    return [...out, ...tasks.map((t): SubmitResult => ({ runId: t.runId, accepted: true, jobId: `${m[1]}_${t.index}`, alreadySubmitted: false, state: "queued" }))];
  }

  private async samplerName(root: string, runId: string): Promise<string | null> {
    const known = this.samplerOf.get(runId);
    if (known) return known;
    try {
      const text = await this.connection.sftp<Buffer>((s, cb) => s.readFile(posix.join(root, runId, "run.json"), cb));
      const name = (JSON.parse(text.toString("utf8")) as { sampler?: { name?: unknown } }).sampler?.name;
      return typeof name === "string" ? name : null;
    } catch {
      return null;
    }
  }

  private async inspect(runs: { runId: string; errFile: string | null }[]): Promise<Map<string, RunFolderInfo>> {
    const out = new Map<string, RunFolderInfo>();
    for (const batch of chunks(runs, 2000)) {
      const r = await this.connection.exec(inspectCommand(await this.workRoot()), { stdin: inspectInput(batch), idempotent: true });
      if (r.code !== 0) throw new ClusterProtocolError(`reading run folders failed with exit ${r.code}: ${r.stderr.trim().slice(0, 300)}`, r.code);
      for (const [k, v] of parseInspect(r.stdout)) out.set(k, v);
    }
    return out;
  }

  async status(runIds?: string[]): Promise<RunStatus[]> {
    runIds?.forEach((id) => check(ID.test(id), `status: invalid run id "${id}"`));
    return this.statusFrom(await this.listing.get(), runIds);
  }

  private async statusFrom(rows: Awaited<ReturnType<SchedulerListing["get"]>>, runIds?: string[]): Promise<RunStatus[]> {
    const view = await this.listing.view(rows);
    for (const [id, v] of view) if (this.submitted.get(id)?.token === v.task.token) this.submitted.delete(id);
    const ids = runIds ?? [...new Set([
      ...[...view].filter(([, v]) => ACTIVE.has(mapSchedulerState(v.row).state)).map(([id]) => id),
      ...this.submitted.keys(),
    ])];
    const root = await this.workRoot();
    const look = ids.filter((id) => !this.submitted.has(id) && view.get(id)?.row.state !== "PENDING");
    const folders = look.length
      ? await this.inspect(look.map((id) => { const v = view.get(id); return { runId: id, errFile: v ? `${groupDirOf(root, v.groupId)}/${v.task.index}.err` : null }; }))
      : new Map<string, RunFolderInfo>();
    return ids.map((id) => composeRunStatus(id, {
      view: view.get(id), mine: this.submitted.get(id), cancelledJobId: this.cancelled.get(id), folder: folders.get(id),
    }));
  }

  async fetch(runId: string, localDir: string): Promise<FetchedFile[]> {
    check(ID.test(runId), `fetch: invalid run id "${runId}"`);
    return downloadDir(this.connection, posix.join(await this.workRoot(), runId, "out"), localDir);
  }

  async cancel(runIds: string[]): Promise<RunStatus[]> {
    runIds.forEach((id) => check(ID.test(id), `cancel: invalid run id "${id}"`));
    const view = await this.listing.view(await this.listing.get());
    const targets = runIds.flatMap((id): [string, string][] => {
      const mine = this.submitted.get(id);
      if (mine) return [[id, mine.jobId]];
      const v = view.get(id);
      return v && ACTIVE.has(mapSchedulerState(v.row).state) ? [[id, v.row.jobId]] : [];
    });
    const jobIds = targets.map(([, j]) => j);
    for (const ids of chunks(jobIds, IDS_PER_CALL)) {
      const r = await this.connection.exec(`scancel ${ids.join(" ")}`, { idempotent: true });
      this.schedulerCalls.scancel++;
      if (r.code !== 0) throw new ClusterProtocolError(`scancel failed with exit ${r.code}: ${r.stderr.trim().slice(0, 300)}`, r.code);
    }
    for (const [id, j] of targets) this.cancelled.set(id, j);
    // The scheduler's own answer, taken when the query interval allows.
    return this.statusFrom(await this.listing.get({ fresh: jobIds.length > 0 }), runIds);
  }

  async health(): Promise<ClusterHealth> {
    const p = this.opts.partition ? ` --partition=${this.opts.partition}` : "";
    const r = await this.connection.exec(`sinfo --noheader${p} --format='%T|%C'`, { idempotent: true });
    this.schedulerCalls.sinfo++;
    if (r.code !== 0) throw new ClusterProtocolError(`sinfo failed with exit ${r.code}: ${r.stderr.trim().slice(0, 300)}`, r.code);
    const lines = r.stdout.trim().split("\n").filter(Boolean).map((l) => l.split("|"));
    // %C is allocated/idle/other/total CPUs.
    const cpus = lines.reduce((n, [, c]) => n + Number((c ?? "0/0/0/0").split("/")[3] ?? 0), 0);
    const up = lines.some(([s]) => /^(idle|mixed|allocated|completing)/.test(s ?? ""));
    const rows = await this.listing.get();
    const states = rows.map((x) => mapSchedulerState(x).state);
    return {
      ok: up, node: this.opts.partition ?? "(default partition)", protocol: "batch-scheduler/1", slots: cpus,
      running: states.filter((s) => s === "running").length, queued: states.filter((s) => s === "queued").length,
    };
  }

  close(): Promise<void> {
    return this.connection.close();
  }
}
