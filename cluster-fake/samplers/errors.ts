/**
 * Exit codes of `npm run sampler -- <name> <run.json> <outdir>` (documented in cli.ts):
 *   0 finished, bundle written
 *   1 internal error (a bug or an I/O failure mid-run)
 *   2 bad input: usage, unknown sampler, unreadable/invalid run.json, unknown or
 *     out-of-range parameter, a checkpoint in outdir that belongs to another run
 *   3 interrupted by SIGTERM/SIGINT, checkpoint written; run again on the same outdir to resume
 */
export const EXIT = { ok: 0, internal: 1, badInput: 2, interrupted: 3 } as const;

/** An error caused by the caller's input; the CLI maps it to exit code 2. */
export class BadInputError extends Error {
  constructor(message: string) {
    super(message);
    this.name = "BadInputError";
  }
}
