import fs from "node:fs";
import path from "node:path";

/** Where a run is in the fake node's own life cycle (not the app's run states). */
export type NodeRunState = "queued" | "running" | "exited" | "timed_out" | "cancelled" | "lost";

export const TERMINAL_STATES: ReadonlySet<NodeRunState> = new Set(["exited", "timed_out", "cancelled", "lost"]);

/** Progress as the sampler writes it to out/progress.json. */
export interface Progress {
  sweepsDone: number;
  sweepsTotal: number;
  updatedAt: string;
}

/** Everything the node remembers about one run (the latest attempt). */
export interface RunRecord {
  runId: string;
  jobId: string;
  token: string;
  /** How many times this node has accepted the run (1 = first submission). */
  attempt: number;
  sampler: string;
  state: NodeRunState;
  wallSeconds: number;
  cores: number;
  memoryMb: number;
  submittedAt: string;
  startedAt: string | null;
  finishedAt: string | null;
  exitCode: number | null;
  signal: string | null;
  pid: number | null;
  stderrTail: string;
  /** Why the node ended the run, in words (wall time, cancel, restart, spawn failure). */
  note: string | null;
  progress: Progress | null;
}

/** The whole persisted state of the node. */
export interface NodeState {
  format: "ergodex.cluster-fake.state/1";
  nextJobNumber: number;
  runs: Record<string, RunRecord>;
  /** FIFO of queued run ids. */
  queue: string[];
}

function emptyState(): NodeState {
  return { format: "ergodex.cluster-fake.state/1", nextJobNumber: 1, runs: {}, queue: [] };
}

/** JSON file store for NodeState with atomic replace. */
export class StateStore {
  readonly file: string;
  state: NodeState = emptyState();

  constructor(stateDir: string) {
    this.file = path.join(stateDir, "state.json");
  }

  /**
   * Read the state left by a previous process. Runs that were running then have no
   * process watching them any more, so they become `lost`; their ids are returned.
   */
  load(now: Date): string[] {
    if (!fs.existsSync(this.file)) {
      this.state = emptyState();
      return [];
    }
    let parsed: NodeState;
    try {
      parsed = JSON.parse(fs.readFileSync(this.file, "utf8")) as NodeState;
    } catch (err) {
      throw new Error(`fake cluster state ${this.file} is not valid JSON: ${(err as Error).message}`);
    }
    if (parsed.format !== "ergodex.cluster-fake.state/1") {
      throw new Error(`fake cluster state ${this.file}: unknown format ${String(parsed.format)}`);
    }
    this.state = parsed;
    const lost: string[] = [];
    for (const rec of Object.values(parsed.runs)) {
      if (rec.state === "running") {
        rec.state = "lost";
        rec.finishedAt = now.toISOString();
        rec.note = "the node restarted while the run was running";
        lost.push(rec.runId);
      }
    }
    if (lost.length > 0) this.save();
    return lost;
  }

  /**
   * Write temp file then rename, so a crash mid-write leaves the old state intact.
   * Synchronous on purpose: writes never interleave and the file stays small.
   */
  save(): void {
    fs.mkdirSync(path.dirname(this.file), { recursive: true });
    const tmp = `${this.file}.${process.pid}.tmp`;
    fs.writeFileSync(tmp, JSON.stringify(this.state, null, 2));
    fs.renameSync(tmp, this.file);
  }
}
