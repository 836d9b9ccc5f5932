import { describe, expect, it } from "vitest";
import { decodeWaitStatus, mapSchedulerState, parseSqueue } from "@/broker/adapters/batch-status";
import { groupIdFromJobName, groupIdOf, jobNameOf, parseTasks, renderBatchScript, renderTasks, signalLead, wallMinutes } from "@/broker/adapters/batch-script";
import { parseInspect } from "@/broker/adapters/batch-inspect";

// Pure parts of the batch-scheduler adapter; needs no daemons. The states, reasons and wait
// statuses below are what this scheduler (slurm-wlm 22.05, Debian 12) printed for jobs on the
// loopback test cluster: a completed array task, a script that exited 3 on the warning signal, one
// stopped at its 1-minute limit, a waiting task. The times are made up.
const LISTING = [
  "1_2|1|2|ergodex-07bac2e2189334c4ce77e169|COMPLETED|None|0|1764630064|1764630069|1764630070|",
  "7|7|N/A|t.sh|FAILED|NonZeroExitCode|768|1764630798|1764630799|1764630812|",
  "8|8|N/A|t.sh|TIMEOUT|TimeLimit|768|1764630799|1764630799|1764630872|",
  "9_4|9|4|ergodex-07bac2e2189334c4ce77e169|PENDING|Resources|0|1764630064|0|0|",
].join("\n");

describe("batch scheduler listing", () => {
  it("parses one row per array task, with epoch times and the raw wait status", () => {
    const rows = parseSqueue(LISTING);
    expect(rows[0]).toEqual({
      jobId: "1_2", arrayJobId: "1", taskIndex: 2, name: "ergodex-07bac2e2189334c4ce77e169", state: "COMPLETED", reason: "None",
      waitStatus: 0, submittedAt: "2025-12-01T23:01:04.000Z", startedAt: "2025-12-01T23:01:09.000Z", finishedAt: "2025-12-01T23:01:10.000Z",
    });
    expect(rows[1].taskIndex).toBeNull();
    expect(rows[3]).toMatchObject({ state: "PENDING", startedAt: null, finishedAt: null });
  });

  it("names the line that does not fit", () => {
    expect(() => parseSqueue(`${LISTING}\nnot|enough`)).toThrow(/line 5 has 2 fields/);
  });

  it("decodes wait statuses as waitpid does", () => {
    expect(decodeWaitStatus(768)).toEqual({ exitCode: 3, signal: null });
    expect(decodeWaitStatus(9)).toEqual({ exitCode: null, signal: 9 });
    expect(decodeWaitStatus(null)).toEqual({ exitCode: null, signal: null });
  });
});

describe("scheduler state → adapter state", () => {
  const m = (state: string, waitStatus: number | null, tail = "") => mapSchedulerState({ state, reason: "r", waitStatus }, tail);
  it("maps running and waiting states without a failure", () => {
    for (const s of ["PENDING", "CONFIGURING", "REQUEUED"]) expect(m(s, 0)).toMatchObject({ state: "queued", failure: null });
    for (const s of ["RUNNING", "COMPLETING", "SUSPENDED"]) expect(m(s, 0)).toMatchObject({ state: "running", failure: null });
  });
  it("completed with 0 is success; failed carries the exit code and the stderr tail", () => {
    expect(m("COMPLETED", 0)).toEqual({ state: "exited", exitCode: 0, signal: null, checkpointed: false, failure: null });
    expect(m("FAILED", 2 << 8, "noise\nsampler: unknown parameter /params/bogus\n")).toMatchObject({
      state: "exited", exitCode: 2, failure: { reason: "nonzero_exit", detail: "exit code 2: noise\nsampler: unknown parameter /params/bogus" },
    });
  });
  it("exit 3 is a wall-time stop with a checkpoint, both at the limit and at the warning signal", () => {
    const [, warned, limit] = parseSqueue(LISTING);
    for (const row of [warned, limit]) {
      expect(mapSchedulerState(row)).toMatchObject({ state: "timed_out", exitCode: 3, checkpointed: true, failure: { reason: "wall_time_exceeded" } });
    }
    expect(m("TIMEOUT", 9)).toMatchObject({ state: "timed_out", checkpointed: false, signal: "SIGKILL", failure: { reason: "wall_time_exceeded", detail: /without a checkpoint/ } });
  });
  it("cancelled, node failure, out of memory, signals and launch failures", () => {
    expect(m("CANCELLED", 15)).toMatchObject({ state: "cancelled", failure: null });
    expect(m("NODE_FAIL", 0)).toMatchObject({ state: "lost", failure: { reason: "node_lost" } });
    expect(m("PREEMPTED", 0)).toMatchObject({ state: "lost", failure: { reason: "node_lost" } });
    expect(m("OUT_OF_MEMORY", 9)).toMatchObject({ state: "exited", failure: { reason: "killed_by_signal", detail: /^out of memory/ } });
    expect(m("FAILED", 11)).toMatchObject({ state: "exited", signal: "SIGSEGV", failure: { reason: "killed_by_signal" } });
    expect(m("FAILED", (128 + 9) << 8)).toMatchObject({ exitCode: 137, failure: { reason: "killed_by_signal", detail: "killed by SIGKILL" } });
    expect(m("FAILED", 127 << 8)).toMatchObject({ failure: { reason: "launch_failed" } });
    expect(m("WEIRD_NEW_STATE", 0)).toMatchObject({ state: "lost", failure: { detail: /unknown job state "WEIRD_NEW_STATE"/ } });
  });
});

describe("job arrays", () => {
  const tasks = [0, 1, 2].map((index) => ({ index, runId: `run-${index}`, token: `tok-${index}`, sampler: "ising2d" }));
  it("names an array by a group id that only depends on its runs and tokens", () => {
    const g = groupIdOf(tasks);
    expect(groupIdOf(tasks.map((t) => ({ ...t })))).toBe(g);
    expect(groupIdOf([{ ...tasks[0], token: "other" }, tasks[1], tasks[2]])).not.toBe(g);
    expect(groupIdFromJobName(jobNameOf(g))).toBe(g);
    expect(groupIdFromJobName("my-own-job")).toBeNull();
    expect(parseTasks(renderTasks(tasks), "tasks.tsv")).toEqual(tasks);
    expect(() => parseTasks("0\trun-0\n", "x/tasks.tsv")).toThrow(/x\/tasks.tsv line 1/);
  });
  it("asks for the run's resources, rounds wall time up to minutes, and keeps the warning inside the limit", () => {
    const s = renderBatchScript("a".repeat(24), tasks, { cores: 4, memoryMb: 1500, wallSeconds: 3601 }, {
      workRoot: "/home/u/runs", samplerCommand: "ergodex-sampler", wallSignalSeconds: 90, partition: "short", prelude: "module load node",
    });
    for (const line of ["--array=0-2", "--cpus-per-task=4", "--mem=1500M", "--time=61", "--signal=B:TERM@90", "--partition=short",
      "--output=/home/u/runs/.ergodex-arrays/aaaaaaaaaaaaaaaaaaaaaaaa/%a.out", "--no-requeue", `--job-name=ergodex-${"a".repeat(24)}`]) {
      expect(s).toContain(`#SBATCH ${line}\n`);
    }
    expect(s.indexOf("module load node")).toBeLessThan(s.indexOf("ergodex-sampler \"$ERGODEX_SAMPLER\""));
    expect(signalLead(90, 1)).toBe(55);
    expect(wallMinutes(60)).toBe(1);
    expect(() => wallMinutes(0)).toThrow(/positive/);
    expect(() => renderBatchScript("b".repeat(24), tasks, { cores: 1, memoryMb: 1, wallSeconds: 60 }, { workRoot: "/home/u/my runs", samplerCommand: "x", wallSignalSeconds: 0 }))
      .toThrow(/work root/);
  });
  it("reads the run-folder report: progress, task markers and the stderr tail", () => {
    const text = [
      "R\trun-0", 'P\t{"sweepsDone":5,"sweepsTotal":10,"updatedAt":"2026-01-01T00:00:00.000Z"}',
      "M\ttok-0.started\t4_0\tgggg\t0\t1764630064", "M\ttok-0.exit\t3\t1764630070",
      `T\t${Buffer.from("sampler: stopped\n").toString("base64")}`, "R\trun-1",
    ].join("\n");
    const info = parseInspect(text);
    expect(info.get("run-0")).toEqual({
      progress: { sweepsDone: 5, sweepsTotal: 10, updatedAt: "2026-01-01T00:00:00.000Z" }, stderrTail: "sampler: stopped\n",
      tokens: new Map([["tok-0", { jobId: "4_0", groupId: "gggg", index: 0, startedAt: "2025-12-01T23:01:04.000Z", exitCode: 3, finishedAt: "2025-12-01T23:01:10.000Z" }]]),
    });
    expect(info.get("run-1")).toEqual({ progress: null, tokens: new Map(), stderrTail: "" });
  });
});
