import fs from "node:fs";
import path from "node:path";
import { spawn, type ChildProcess } from "node:child_process";
import type { Logger } from "pino";
import { StateStore, TERMINAL_STATES, type RunRecord } from "./state-store.js";
import { readProgress, readSamplerName } from "./run-files.js";

/** One run in a submit request. */
export interface SubmitItem {
  runId: string;
  token: string;
  wallSeconds: number;
  cores: number;
  memoryMb: number;
}

/** Per-run answer to submit: the record, or why the run was refused. */
export type SubmitOutcome =
  | { runId: string; ok: true; created: boolean; run: RunRecord }
  | { runId: string; ok: false; error: { code: string; message: string } };

export interface SchedulerOptions {
  workRoot: string;
  slots: number;
  samplerCommand: string[];
  samplerEnv: Record<string, string>;
  killGraceMs: number;
  logger: Logger;
}

interface ActiveChild {
  child: ChildProcess;
  wallTimer: NodeJS.Timeout;
  killTimer: NodeJS.Timeout | null;
  ended: Promise<void>;
  endReason: "timed_out" | "cancelled" | "shutdown" | null;
  stderr: string;
}

const STDERR_TAIL_CHARS = 4000;

/** FIFO queue with a slot limit that runs samplers as child processes. */
export class RunScheduler {
  private active = new Map<string, ActiveChild>();
  private stopping = false;
  /** Highest number of runs seen running at once, for tests of the slot limit. */
  peakRunning = 0;

  constructor(private readonly opts: SchedulerOptions, private readonly store: StateStore) {}

  /** Start whatever the loaded state still has queued. */
  resume(): void {
    this.pump();
  }

  get runningCount(): number {
    return this.active.size;
  }

  get queuedCount(): number {
    return this.store.state.queue.length;
  }

  runDir(runId: string): string {
    return path.join(this.opts.workRoot, runId);
  }

  /** Queue runs; same id + same token is a no-op, a new token restarts a finished run. */
  submit(items: SubmitItem[], now = new Date()): SubmitOutcome[] {
    const out = items.map((item) => this.submitOne(item, now));
    this.store.save();
    this.pump();
    return out.map((o) => (o.ok ? { ...o, run: this.withProgress(this.store.state.runs[o.runId]) } : o));
  }

  private submitOne(item: SubmitItem, now: Date): SubmitOutcome {
    const { runs } = this.store.state;
    const existing = runs[item.runId];
    if (existing && existing.token === item.token) {
      return { runId: item.runId, ok: true, created: false, run: existing };
    }
    if (existing && !TERMINAL_STATES.has(existing.state)) {
      return {
        runId: item.runId, ok: false,
        error: { code: "conflict", message: `run is ${existing.state} under another dispatch token` },
      };
    }
    let sampler: string;
    try {
      sampler = readSamplerName(path.join(this.runDir(item.runId), "run.json"));
    } catch (err) {
      return { runId: item.runId, ok: false, error: { code: "not_staged", message: (err as Error).message } };
    }
    const rec: RunRecord = {
      runId: item.runId,
      jobId: String(this.store.state.nextJobNumber++),
      token: item.token,
      attempt: (existing?.attempt ?? 0) + 1,
      sampler,
      state: "queued",
      wallSeconds: item.wallSeconds,
      cores: item.cores,
      memoryMb: item.memoryMb,
      submittedAt: now.toISOString(),
      startedAt: null, finishedAt: null, exitCode: null, signal: null, pid: null,
      stderrTail: "", note: null,
      progress: null,
    };
    runs[item.runId] = rec;
    this.store.state.queue.push(item.runId);
    return { runId: item.runId, ok: true, created: true, run: rec };
  }

  /** Records for the given ids (unknown ids left out), or all / only active ones. */
  report(runIds: string[] | null, activeOnly: boolean): { runs: RunRecord[]; unknown: string[] } {
    const { runs } = this.store.state;
    if (runIds) {
      return {
        runs: runIds.filter((id) => runs[id]).map((id) => this.withProgress(runs[id])),
        unknown: runIds.filter((id) => !runs[id]),
      };
    }
    const all = Object.values(runs).filter((r) => !activeOnly || !TERMINAL_STATES.has(r.state));
    return { runs: all.map((r) => this.withProgress(r)), unknown: [] };
  }

  /** Cancel runs; waits until running ones have exited (at most the kill grace). */
  async cancel(runIds: string[], now = new Date()): Promise<{ runs: RunRecord[]; unknown: string[] }> {
    const { state } = this.store;
    const waits: Promise<void>[] = [];
    for (const id of runIds) {
      const rec = state.runs[id];
      if (!rec) continue;
      if (rec.state === "queued") {
        state.queue = state.queue.filter((q) => q !== id);
        Object.assign(rec, { state: "cancelled", finishedAt: now.toISOString(), note: "cancelled while queued" });
      } else if (rec.state === "running") {
        const a = this.active.get(id);
        if (a) waits.push(this.terminate(id, a, "cancelled"));
      }
    }
    this.store.save();
    await Promise.all(waits);
    return this.report(runIds, false);
  }

  /** Terminate every child (SIGTERM, then SIGKILL after the grace) and record them lost. */
  async shutdown(): Promise<void> {
    this.stopping = true;
    await Promise.all([...this.active].map(([id, a]) => this.terminate(id, a, "shutdown")));
    this.store.save();
  }

  private terminate(runId: string, a: ActiveChild, reason: NonNullable<ActiveChild["endReason"]>): Promise<void> {
    if (a.endReason === null) {
      a.endReason = reason;
      signalGroup(a.child, "SIGTERM");
      a.killTimer = setTimeout(() => signalGroup(a.child, "SIGKILL"), this.opts.killGraceMs);
      this.opts.logger.info({ runId, reason }, "terminating run");
    }
    return a.ended;
  }

  private pump(): void {
    const { state } = this.store;
    let changed = false;
    while (!this.stopping && this.active.size < this.opts.slots && state.queue.length > 0) {
      const id = state.queue.shift()!;
      this.launch(state.runs[id]);
      changed = true;
    }
    if (changed) this.store.save();
  }

  private launch(rec: RunRecord): void {
    const dir = this.runDir(rec.runId);
    const outDir = path.join(dir, "out");
    fs.mkdirSync(outDir, { recursive: true });
    const vars: Record<string, string> = {
      sampler: rec.sampler, runJson: path.join(dir, "run.json"), outDir, runId: rec.runId, jobId: rec.jobId,
    };
    const [cmd, ...args] = this.opts.samplerCommand.map((a) => a.replace(/\{(\w+)\}/g, (m, k: string) => vars[k] ?? m));
    const stdout = fs.openSync(path.join(dir, "stdout.log"), "a");
    const stderrLog = fs.createWriteStream(path.join(dir, "stderr.log"), { flags: "a" });
    // detached: the run gets its own process group, so SIGKILL reaches grandchildren (tsx spawns one).
    const child = spawn(cmd, args, {
      cwd: dir, detached: true, stdio: ["ignore", stdout, "pipe"],
      env: { ...process.env, ...this.opts.samplerEnv, ERGODEX_RUN_ID: rec.runId, ERGODEX_JOB_ID: rec.jobId, ERGODEX_CORES: String(rec.cores) },
    });
    fs.closeSync(stdout);
    let resolveEnded!: () => void;
    const a: ActiveChild = {
      child, killTimer: null, endReason: null, stderr: "",
      ended: new Promise((r) => { resolveEnded = r; }),
      wallTimer: setTimeout(() => this.terminate(rec.runId, a, "timed_out"), rec.wallSeconds * 1000),
    };
    this.active.set(rec.runId, a);
    this.peakRunning = Math.max(this.peakRunning, this.active.size);
    Object.assign(rec, { state: "running", startedAt: new Date().toISOString(), pid: child.pid ?? null });
    child.stderr!.on("data", (chunk: Buffer) => {
      stderrLog.write(chunk);
      a.stderr = (a.stderr + chunk.toString("utf8")).slice(-STDERR_TAIL_CHARS);
    });
    let done = false;
    const finish = (code: number | null, signal: string | null, spawnError?: Error) => {
      if (done) return;
      done = true;
      clearTimeout(a.wallTimer);
      if (a.killTimer) clearTimeout(a.killTimer);
      stderrLog.end();
      this.active.delete(rec.runId);
      this.record(rec, a, code, signal, spawnError);
      resolveEnded();
      this.pump();
    };
    child.on("error", (err) => finish(null, null, err));
    child.on("close", (code, signal) => finish(code, signal));
    this.opts.logger.info({ runId: rec.runId, jobId: rec.jobId, pid: child.pid }, "run started");
  }

  private record(rec: RunRecord, a: ActiveChild, code: number | null, signal: string | null, spawnError?: Error) {
    const stateFor = { timed_out: "timed_out", cancelled: "cancelled", shutdown: "lost" } as const;
    const notes = {
      timed_out: `wall time of ${rec.wallSeconds} s exceeded`,
      cancelled: "cancelled while running",
      shutdown: "the node shut down while the run was running",
    };
    Object.assign(rec, {
      state: a.endReason ? stateFor[a.endReason] : "exited",
      finishedAt: new Date().toISOString(),
      exitCode: code, signal,
      stderrTail: a.stderr,
      note: spawnError ? `could not start the sampler: ${spawnError.message}` : a.endReason ? notes[a.endReason] : null,
    });
    this.withProgress(rec);
    this.store.save();
    this.opts.logger.info({ runId: rec.runId, state: rec.state, exitCode: code, signal }, "run ended");
  }

  /** Refresh progress from out/progress.json; a half-written file keeps the last good value. */
  private withProgress(rec: RunRecord): RunRecord {
    const live = this.active.get(rec.runId);
    if (live) rec.stderrTail = live.stderr;
    if (rec.startedAt !== null) {
      const p = readProgress(path.join(this.runDir(rec.runId), "out", "progress.json"), Date.parse(rec.startedAt));
      if (p) rec.progress = p;
    }
    return rec;
  }
}

function signalGroup(child: ChildProcess, sig: NodeJS.Signals): void {
  if (child.pid === undefined || child.exitCode !== null || child.signalCode !== null) return;
  try {
    process.kill(-child.pid, sig);
  } catch {
    // The group is already gone; the close handler records the end.
  }
}
