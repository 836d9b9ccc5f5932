/** The sampler command line as a function (cli.ts is the process wrapper; see there for usage and exit codes). */
import fs from "node:fs";
import { Worker } from "node:worker_threads";
import { SAMPLER_NAMES, SAMPLER_VERSIONS } from "../../lib/samplers/schemas";
import { isSamplerName, validateParams, validateRunInput } from "../../lib/samplers/validate";
import type { DriveResult } from "./driver";
import { BadInputError, EXIT } from "./errors";
import type { WorkerInput, WorkerReply } from "./worker";

const USAGE = `usage: sampler <name> <run.json> <outdir> (name: ${SAMPLER_NAMES.join(", ")})`;

function readRunJson(file: string): unknown {
  let text: string;
  try {
    text = fs.readFileSync(file, "utf8");
  } catch (err) {
    throw new BadInputError(`cannot read run.json at ${file}: ${(err as NodeJS.ErrnoException).code ?? (err as Error).message}`);
  }
  try {
    return JSON.parse(text);
  } catch (err) {
    throw new BadInputError(`run.json at ${file} is not valid JSON: ${(err as Error).message}`);
  }
}

/** Outcome of one CLI invocation: exit code and the one stderr line (empty on success). */
export interface CliOutcome {
  code: number;
  message: string;
}

/** Exit code and one-line reason for an error thrown by a run. */
export function outcomeOfError(err: unknown): CliOutcome {
  const text = err instanceof Error ? err.message : String(err);
  const oneLine = text.replace(/\s*\n\s*/g, " ");
  return err instanceof BadInputError
    ? { code: EXIT.badInput, message: oneLine }
    : { code: EXIT.internal, message: `internal error: ${oneLine}` };
}

/** Run the CLI on argv (without node and script); never throws. */
export async function runCli(argv: string[]): Promise<CliOutcome> {
  try {
    return await main(argv);
  } catch (err) {
    return outcomeOfError(err);
  }
}

async function main(argv: string[]): Promise<CliOutcome> {
  if (argv.length !== 3) throw new BadInputError(USAGE);
  const [name, runFile, outdir] = argv;
  if (!isSamplerName(name)) throw new BadInputError(`unknown sampler "${name}" (known: ${SAMPLER_NAMES.join(", ")})`);
  const checked = validateRunInput(readRunJson(runFile));
  if (!checked.ok) throw new BadInputError(checked.error);
  const run = checked.value;
  if (run.sampler.name !== name) {
    throw new BadInputError(`run.json.sampler.name is "${run.sampler.name}" but the command runs "${name}"`);
  }
  if (run.sampler.version !== SAMPLER_VERSIONS[name]) {
    throw new BadInputError(
      `run.json asks for ${name} ${run.sampler.version}; this build provides ${SAMPLER_VERSIONS[name]}`,
    );
  }
  const params = validateParams(name, run.params);
  if (!params.ok) throw new BadInputError(params.error);
  try {
    fs.mkdirSync(outdir, { recursive: true });
  } catch (err) {
    throw new BadInputError(`cannot create outdir ${outdir}: ${(err as NodeJS.ErrnoException).code}`);
  }

  // The chain runs in a worker thread (see worker.ts); signals only raise a shared flag.
  const flag = new Int32Array(new SharedArrayBuffer(4));
  let signalName = "";
  const onSignal = (sig: NodeJS.Signals) => {
    signalName = sig;
    Atomics.store(flag, 0, 1);
  };
  process.on("SIGTERM", onSignal);
  process.on("SIGINT", onSignal);
  try {
    const result = await runInWorker({ options: { run, sampler: name, params: params.value, outdir }, flag });
    if (result.status === "interrupted") {
      return {
        code: EXIT.interrupted,
        message: `interrupted by ${signalName || "a stop request"} after ${result.sweepsDone} sweeps; checkpoint written to ${outdir}/checkpoint.json (rerun to resume)`,
      };
    }
    return { code: EXIT.ok, message: "" };
  } finally {
    process.off("SIGTERM", onSignal);
    process.off("SIGINT", onSignal);
  }
}

function runInWorker(input: WorkerInput): Promise<DriveResult> {
  return new Promise((resolve, reject) => {
    const worker = new Worker(new URL("./worker-entry.mjs", import.meta.url), { workerData: input });
    worker.once("message", (reply: WorkerReply) => {
      if (reply.ok) resolve(reply.result);
      else reject(reply.badInput ? new BadInputError(reply.message) : new Error(reply.message));
    });
    worker.once("error", reject);
    worker.once("exit", (code) => reject(new Error(`sampler worker exited with code ${code} before reporting`)));
  });
}
