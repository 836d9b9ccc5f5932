import { posix } from "node:path";
import type { SshConnection } from "./ssh-connection";
import { ClusterProtocolError } from "./errors";
import { parseSqueue, squeueCommand, type SchedulerRow } from "./batch-status";
import { groupDirOf, groupIdFromJobName, parseTasks, type ArrayTask } from "./batch-script";

/**
 * The scheduler's job listing as the adapter sees it: one `squeue` per query interval at most
 * (the gate), every Ergodex job of the cluster user, and for each array task the run it carries
 * (from the array's tasks.tsv, read once per array and kept: it never changes).
 */

/** Scheduler commands sent, by command: what a site would count against us. */
export interface SchedulerCallStats {
  squeue: number;
  sbatch: number;
  scancel: number;
  sinfo: number;
}

/** A run as the latest array task carrying it. */
export interface RunTaskView {
  row: SchedulerRow;
  task: ArrayTask;
  groupId: string;
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

/** Spaces calls of one kind at least `intervalMs` apart (waits, never drops). */
export class IntervalGate {
  private last = -Infinity;
  constructor(private readonly intervalMs: number) {}
  /** Milliseconds since the last pass. */
  age(now = Date.now()): number {
    return now - this.last;
  }
  async pass(): Promise<void> {
    const wait = this.last + this.intervalMs - Date.now();
    if (wait > 0) await sleep(wait);
    this.last = Date.now();
  }
}

/** Job listing with a query-interval gate and the array → run map. */
export class SchedulerListing {
  private rows: SchedulerRow[] | null = null;
  private readonly gate: IntervalGate;
  private readonly tasksByGroup = new Map<string, ArrayTask[]>();

  constructor(
    private readonly conn: SshConnection,
    private readonly user: () => Promise<string>,
    private readonly workRoot: () => Promise<string>,
    readonly intervalMs: number,
    private readonly stats: SchedulerCallStats,
  ) {
    this.gate = new IntervalGate(intervalMs);
  }

  /** Remember the task map of an array this adapter wrote (saves reading it back). */
  learnGroup(groupId: string, tasks: ArrayTask[]): void {
    this.tasksByGroup.set(groupId, tasks);
  }

  /**
   * The listing, no older than the query interval. `fresh` forces a new query, waiting for the
   * gate if the last one was too recent (after a cancel, to report the scheduler's own answer).
   */
  async get(o: { fresh?: boolean } = {}): Promise<SchedulerRow[]> {
    if (this.rows && !o.fresh && this.gate.age() < this.intervalMs) return this.rows;
    await this.gate.pass();
    const r = await this.conn.exec(squeueCommand(await this.user()), { idempotent: true });
    this.stats.squeue++; // counted once the scheduler has answered
    if (r.code !== 0) throw new ClusterProtocolError(`squeue failed with exit ${r.code}: ${r.stderr.trim().slice(0, 300)}`, r.code);
    this.rows = parseSqueue(r.stdout).filter((x) => groupIdFromJobName(x.name) !== null);
    return this.rows;
  }

  /** Runs of the listing, each by its latest task (highest array job id). */
  async view(rows: SchedulerRow[]): Promise<Map<string, RunTaskView>> {
    const groups = [...new Set(rows.map((r) => groupIdFromJobName(r.name)!))];
    await this.loadGroups(groups.filter((g) => !this.tasksByGroup.has(g)));
    const out = new Map<string, RunTaskView>();
    for (const row of rows) {
      const groupId = groupIdFromJobName(row.name)!;
      const task = this.tasksByGroup.get(groupId)?.find((t) => t.index === row.taskIndex);
      if (!task) continue; // an array whose task map is gone: nothing we can attribute
      const prev = out.get(task.runId);
      if (!prev || Number(row.arrayJobId) > Number(prev.row.arrayJobId)) out.set(task.runId, { row, task, groupId });
    }
    return out;
  }

  /** Read the task maps of arrays submitted before this adapter existed, in one exec. */
  private async loadGroups(groupIds: string[]): Promise<void> {
    if (groupIds.length === 0) return;
    const root = await this.workRoot();
    const files = groupIds.map((g) => posix.join(groupDirOf(root, g), "tasks.tsv"));
    const script = files.map((f, i) => `printf '#%s\\n' ${groupIds[i]}; cat '${f}' 2>/dev/null`).join("; ");
    const r = await this.conn.exec(`/bin/sh -c "${script.replace(/"/g, '\\"')}"`, { idempotent: true });
    let cur: string | null = null;
    const text: Record<string, string> = {};
    for (const line of r.stdout.split("\n")) {
      if (line.startsWith("#")) { cur = line.slice(1); text[cur] = ""; } else if (cur && line) text[cur] += `${line}\n`;
    }
    for (const g of groupIds) this.tasksByGroup.set(g, parseTasks(text[g] ?? "", `${groupDirOf(root, g)}/tasks.tsv`));
  }
}
