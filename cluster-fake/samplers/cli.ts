/**
 * Built-in sampler entry point:
 *   npm run sampler -- <name> <run.json> <outdir>
 * Reads run.json (DESIGN.md), writes the result bundle (series, manifest.json, progress.json,
 * extra files) into outdir. Needs nothing but Node.
 *
 * Exit codes (also in errors.ts): 0 done; 1 internal error; 2 bad input (usage, unknown
 * sampler, unreadable/invalid run.json, unknown or out-of-range parameter, foreign
 * checkpoint); 3 interrupted by SIGTERM/SIGINT with checkpoint.json written — run the same
 * command again to resume. Every failure prints exactly one line on stderr.
 */
import fs from "node:fs";
import { SAMPLER_NAMES, SAMPLER_VERSIONS } from "@/lib/samplers/schemas";
import { isSamplerName, validateParams, validateRunInput } from "@/lib/samplers/validate";
import { driveRun, type StopFlag } from "./driver";
import { BadInputError, EXIT } from "./errors";

const USAGE = `usage: sampler <name> <run.json> <outdir> (name: ${SAMPLER_NAMES.join(", ")})`;

function fail(code: number, message: string): never {
  process.stderr.write(`sampler: ${message.replace(/\s*\n\s*/g, " ")}\n`);
  process.exit(code);
}

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

async function main(argv: string[]): Promise<number> {
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

  const stop: StopFlag = { requested: false };
  let signalName = "";
  const onSignal = (sig: NodeJS.Signals) => {
    stop.requested = true;
    signalName = sig;
  };
  process.on("SIGTERM", onSignal);
  process.on("SIGINT", onSignal);

  const result = await driveRun({ run, sampler: name, params: params.value, outdir, stop });
  if (result.status === "interrupted") {
    process.stderr.write(
      `sampler: interrupted by ${signalName} after ${result.sweepsDone} sweeps; checkpoint written to ${outdir}/checkpoint.json (rerun to resume)\n`,
    );
    return EXIT.interrupted;
  }
  return EXIT.ok;
}

main(process.argv.slice(2)).then(
  (code) => process.exit(code),
  (err: unknown) => {
    if (err instanceof BadInputError) fail(EXIT.badInput, err.message);
    fail(EXIT.internal, `internal error: ${err instanceof Error ? err.message : String(err)}`);
  },
);
