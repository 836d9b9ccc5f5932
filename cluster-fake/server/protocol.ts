import { Ajv } from "ajv";
import type { RunScheduler, SubmitItem } from "./scheduler.js";

/** Version tag of the exec protocol, reported by `health`. */
export const PROTOCOL = "ergodex-node/1";
export const COMMAND = "ergodex-node";

/** Exit codes of the protocol (documented in docs/fake-cluster.md). */
export const EXIT = { ok: 0, internal: 1, badRequest: 2, unknownCommand: 127 } as const;

export const RUN_ID = /^[A-Za-z0-9][A-Za-z0-9._-]{0,127}$/;

/** What the exec channel sends back: one JSON document on stdout and an exit code. */
export interface Reply {
  code: number;
  body: unknown;
  /** One human line for stderr when the request failed. */
  stderr?: string;
}

export interface CommandContext {
  scheduler: RunScheduler;
  user: string;
  nodeName: string;
  startedAt: Date;
  slots: number;
}

const ajv = new Ajv({ allErrors: true });
const validateSubmit = ajv.compile<{ runs: SubmitItem[] }>({
  type: "object",
  required: ["runs"],
  additionalProperties: false,
  properties: {
    runs: {
      type: "array", minItems: 1, maxItems: 10000,
      items: {
        type: "object",
        required: ["runId", "token", "wallSeconds", "cores", "memoryMb"],
        additionalProperties: false,
        properties: {
          runId: { type: "string", pattern: RUN_ID.source },
          token: { type: "string", pattern: "^[A-Za-z0-9][A-Za-z0-9._:-]{0,127}$" },
          // setTimeout holds at most ~24.8 days; 2e6 s stays below it.
          wallSeconds: { type: "number", exclusiveMinimum: 0, maximum: 2_000_000 },
          cores: { type: "integer", minimum: 1, maximum: 1024 },
          memoryMb: { type: "integer", minimum: 1 },
        },
      },
    },
  },
});

function bad(message: string): Reply {
  return { code: EXIT.badRequest, body: { error: { code: "bad_request", message } }, stderr: message };
}

/** Split an exec command line; there is no shell, so no quoting or expansion. */
export function parseCommandLine(line: string): string[] {
  return line.trim().split(/\s+/).filter((w) => w.length > 0);
}

/** True when the command reads a JSON request from stdin. */
export function readsStdin(argv: string[]): boolean {
  return argv[0] === COMMAND && argv[1] === "submit";
}

function checkIds(ids: string[]): string | null {
  const badId = ids.find((id) => !RUN_ID.test(id));
  return badId === undefined ? null : `invalid run id "${badId}": expected ${RUN_ID.source}`;
}

/** Execute one protocol command. */
export async function runCommand(argv: string[], stdin: string, ctx: CommandContext): Promise<Reply> {
  if (argv[0] !== COMMAND) {
    const message = `unknown command "${argv[0] ?? ""}": this node only runs ${COMMAND}`;
    return { code: EXIT.unknownCommand, body: { error: { code: "unknown_command", message } }, stderr: message };
  }
  const [, sub, ...rest] = argv;
  const s = ctx.scheduler;
  switch (sub) {
    case "health":
      return {
        code: EXIT.ok,
        body: {
          ok: true, protocol: PROTOCOL, node: ctx.nodeName, slots: ctx.slots, running: s.runningCount,
          queued: s.queuedCount, startedAt: ctx.startedAt.toISOString(), time: new Date().toISOString(),
        },
      };
    case "whoami":
      return { code: EXIT.ok, body: { user: ctx.user, node: ctx.nodeName, workDir: "/" } };
    case "submit": {
      let req: unknown;
      try {
        req = JSON.parse(stdin);
      } catch (err) {
        return bad(`submit: stdin is not JSON: ${(err as Error).message}`);
      }
      if (!validateSubmit(req)) {
        const e = validateSubmit.errors!.map((x) => `${x.instancePath || "/"} ${x.message}`).join("; ");
        return bad(`submit: ${e}`);
      }
      const ids = req.runs.map((r) => r.runId);
      const dup = ids.find((id, i) => ids.indexOf(id) !== i);
      if (dup) return bad(`submit: run ${dup} appears twice in one request`);
      return { code: EXIT.ok, body: { results: s.submit(req.runs) } };
    }
    case "report": {
      const activeOnly = rest[0] === "--active";
      const ids = activeOnly ? rest.slice(1) : rest;
      const err = checkIds(ids);
      if (err) return bad(`report: ${err}`);
      const r = s.report(ids.length > 0 ? ids : null, activeOnly);
      return { code: EXIT.ok, body: { time: new Date().toISOString(), ...r } };
    }
    case "cancel": {
      if (rest.length === 0) return bad("cancel: give at least one run id");
      const err = checkIds(rest);
      if (err) return bad(`cancel: ${err}`);
      return { code: EXIT.ok, body: await s.cancel(rest) };
    }
    default:
      return bad(`unknown subcommand "${sub ?? ""}": expected health, whoami, submit, report or cancel`);
  }
}
