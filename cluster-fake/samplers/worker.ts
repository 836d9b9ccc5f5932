/**
 * Worker thread that runs the chain for the CLI. The main thread stays idle, so a SIGTERM
 * is acknowledged at once even while one sweep takes long; this matters under `tsx`, whose
 * parent process force-kills the child if the child does not take up a relayed signal
 * within ~30 ms. The stop request crosses threads as a shared Int32 read between sweeps.
 */
import { parentPort, workerData } from "node:worker_threads";
import { driveRun, type DriveOptions, type DriveResult, type StopFlag } from "./driver";
import { BadInputError } from "./errors";

/** What the worker receives. */
export interface WorkerInput {
  options: Omit<DriveOptions, "stop">;
  flag: Int32Array;
}

/** What the worker posts back. */
export type WorkerReply = { ok: true; result: DriveResult } | { ok: false; badInput: boolean; message: string };

const { options, flag } = workerData as WorkerInput;
const stop: StopFlag = {
  get requested() {
    return Atomics.load(flag, 0) !== 0;
  },
  set requested(v: boolean) {
    Atomics.store(flag, 0, v ? 1 : 0);
  },
};

driveRun({ ...options, stop }).then(
  (result) => parentPort!.postMessage({ ok: true, result } satisfies WorkerReply),
  (err: unknown) =>
    parentPort!.postMessage({
      ok: false,
      badInput: err instanceof BadInputError,
      message: err instanceof Error ? err.message : String(err),
    } satisfies WorkerReply),
);
