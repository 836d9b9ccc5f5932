import { createHash } from "node:crypto";
import { posix } from "node:path";
import { ClusterError } from "./errors";
import type { RunResources } from "./types";

/**
 * The batch script and task map of one job array. One array per group of runs with the same
 * resources; array task i runs the run on line i of tasks.tsv. Both files sit in the group's
 * folder under the work root, written before submission, so after a crash the broker can tell
 * from the job name alone which runs an array holds.
 */

/** Prefix of every job name Ergodex submits; the rest is the group id. */
export const JOB_NAME_PREFIX = "ergodex-";
/** Folder under the work root that holds one folder per submitted array. */
export const ARRAYS_DIR = ".ergodex-arrays";

/** One array task: the run it carries and how to start it. */
export interface ArrayTask {
  index: number;
  runId: string;
  token: string;
  sampler: string;
}

/** Cluster settings that shape every batch script. */
export interface BatchScriptSettings {
  /** Absolute remote directory holding one folder per run. */
  workRoot: string;
  partition?: string | null;
  account?: string | null;
  /** Shell lines run before the sampler in every task (module loads and the like). */
  prelude?: string | null;
  /** Command that starts a built-in sampler: `<command> <name> <run.json> <outdir>`. */
  samplerCommand: string;
  /** Seconds before the time limit at which the sampler gets SIGTERM to checkpoint; 0 = rely on the limit's own TERM. */
  wallSignalSeconds: number;
}

const SAMPLER_NAME = /^[a-z0-9][a-z0-9_-]{0,63}$/;
/** Remote paths go into #SBATCH lines unquoted, so they are kept to characters that need no quoting. */
export const SAFE_PATH = /^\/[A-Za-z0-9._/+-]*$/;

/** Deterministic group id: the same runs under the same tokens always give the same job name. */
export function groupIdOf(tasks: { runId: string; token: string }[]): string {
  const h = createHash("sha256");
  for (const t of tasks) h.update(`${t.runId}\t${t.token}\n`);
  return h.digest("hex").slice(0, 24);
}

/** Job name for a group. */
export const jobNameOf = (groupId: string): string => `${JOB_NAME_PREFIX}${groupId}`;

/** Group id from a job name, or null for a job Ergodex did not submit. */
export function groupIdFromJobName(name: string): string | null {
  const m = /^ergodex-([0-9a-f]{24})$/.exec(name);
  return m ? m[1] : null;
}

/** Folder of one array's script, task map and per-task output. */
export const groupDirOf = (workRoot: string, groupId: string): string => posix.join(workRoot, ARRAYS_DIR, groupId);

/** Time limit in whole minutes, the scheduler's unit; never below one minute. */
export function wallMinutes(wallSeconds: number): number {
  if (!Number.isFinite(wallSeconds) || wallSeconds <= 0) throw new ClusterError(`wall time must be a positive number of seconds, got ${wallSeconds}`, "bad_request", false);
  return Math.max(1, Math.ceil(wallSeconds / 60));
}

/** Warning-signal lead time for a limit: the configured value, but at most the limit less 5 s. */
export function signalLead(wallSignalSeconds: number, minutes: number): number {
  return Math.max(0, Math.min(Math.floor(wallSignalSeconds), minutes * 60 - 5, 65535));
}

/** tasks.tsv: index, run id, dispatch token, sampler name; tab separated. */
export function renderTasks(tasks: ArrayTask[]): string {
  for (const t of tasks) {
    if (!SAMPLER_NAME.test(t.sampler)) throw new ClusterError(`run ${t.runId}: sampler name "${t.sampler}" is not a plain name`, "bad_request", false);
  }
  return tasks.map((t) => `${t.index}\t${t.runId}\t${t.token}\t${t.sampler}\n`).join("");
}

/** Parse tasks.tsv; `where` names the file in the error. */
export function parseTasks(text: string, where: string): ArrayTask[] {
  return text.split("\n").filter((l) => l !== "").map((line, i) => {
    const [index, runId, token, sampler] = line.split("\t");
    if (!/^\d+$/.test(index ?? "") || !runId || !token || !sampler) {
      throw new ClusterError(`${where} line ${i + 1} is not "index<TAB>runId<TAB>token<TAB>sampler"`, "protocol", false);
    }
    return { index: Number(index), runId, token, sampler };
  });
}

/** The array's batch script. */
export function renderBatchScript(groupId: string, tasks: ArrayTask[], res: RunResources, s: BatchScriptSettings): string {
  const dir = groupDirOf(s.workRoot, groupId);
  if (!SAFE_PATH.test(dir)) throw new ClusterError(`work root ${s.workRoot} must be an absolute path of letters, digits and ._/+-`, "bad_request", false);
  if (!Number.isInteger(res.cores) || res.cores < 1) throw new ClusterError(`cores must be a positive integer, got ${res.cores}`, "bad_request", false);
  if (!Number.isInteger(res.memoryMb) || res.memoryMb < 1) throw new ClusterError(`memory must be a positive number of MB, got ${res.memoryMb}`, "bad_request", false);
  const minutes = wallMinutes(res.wallSeconds);
  const lead = signalLead(s.wallSignalSeconds, minutes);
  const opt = (o: string) => `#SBATCH ${o}`;
  const head = [
    "#!/bin/bash",
    opt(`--job-name=${jobNameOf(groupId)}`),
    opt(`--array=0-${tasks.length - 1}`),
    opt("--nodes=1"), opt("--ntasks=1"),
    opt(`--cpus-per-task=${res.cores}`),
    opt(`--mem=${res.memoryMb}M`),
    opt(`--time=${minutes}`),
    ...(lead > 0 ? [opt(`--signal=B:TERM@${lead}`)] : []),
    opt(`--output=${dir}/%a.out`),
    opt(`--error=${dir}/%a.err`),
    // A requeued task would rerun under the same token behind the broker's back.
    opt("--no-requeue"),
    ...(s.partition ? [opt(`--partition=${s.partition}`)] : []),
    ...(s.account ? [opt(`--account=${s.account}`)] : []),
  ];
  const body = `
# Written by Ergodex: one array task per run; task i runs the run on line i of tasks.tsv.
tasks=${dir}/tasks.tsv
IFS=$'\\t' read -r _ ERGODEX_RUN_ID ERGODEX_DISPATCH_TOKEN ERGODEX_SAMPLER < <(awk -F'\\t' -v i="$SLURM_ARRAY_TASK_ID" '$1 == i' "$tasks")
if [ -z "\${ERGODEX_RUN_ID:-}" ]; then echo "ergodex: no run for array task $SLURM_ARRAY_TASK_ID in $tasks" >&2; exit 70; fi
export ERGODEX_RUN_ID ERGODEX_DISPATCH_TOKEN ERGODEX_JOB_ID="\${SLURM_ARRAY_JOB_ID}_\${SLURM_ARRAY_TASK_ID}" ERGODEX_CORES=${res.cores}
run_dir=${s.workRoot}/$ERGODEX_RUN_ID
mark=$run_dir/.ergodex
mkdir -p "$mark" && cd "$run_dir" || { echo "ergodex: cannot enter $run_dir" >&2; exit 70; }
# Markers let the broker account for this task after the scheduler has forgotten the job.
printf '%s\\t%s\\t%s\\t%s\\n' "$ERGODEX_JOB_ID" ${groupId} "$SLURM_ARRAY_TASK_ID" "$(date -u +%s)" > "$mark/$ERGODEX_DISPATCH_TOKEN.started"
# --- prelude from the cluster settings ---
${s.prelude ?? ""}
# --- sampler ---
${s.samplerCommand} "$ERGODEX_SAMPLER" "$run_dir/run.json" "$run_dir/out" &
pid=$!
# The wall-time warning reaches only this shell (B:); hand it to the sampler, which checkpoints (exit 3).
trap 'kill -TERM "$pid" 2>/dev/null' TERM INT
while :; do wait "$pid"; code=$?; kill -0 "$pid" 2>/dev/null || break; done
printf '%s\\t%s\\n' "$code" "$(date -u +%s)" > "$mark/$ERGODEX_DISPATCH_TOKEN.exit"
exit "$code"
`;
  return `${head.join("\n")}\n${body}`;
}
