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
 *
 * The sampler files import each other by relative paths (not "@/"), so the CLI also runs
 * when started from a directory other than the repository root. The chain itself runs in
 * a worker thread (worker.ts) so that signals are taken up at once.
 */
import { runCli } from "./cli-main";

runCli(process.argv.slice(2)).then((o) => {
  if (o.message) process.stderr.write(`sampler: ${o.message}\n`);
  process.exit(o.code);
});
