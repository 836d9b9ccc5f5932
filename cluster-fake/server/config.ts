import path from "node:path";
import pino, { type Logger } from "pino";

/** Options accepted by startFakeCluster; everything has a default. */
export interface FakeClusterOptions {
  /** Interface to listen on; the fake cluster is loopback-only by design. */
  host?: string;
  /** TCP port; 0 picks a free one (tests). */
  port?: number;
  /** Holds the host key, authorized_keys, state.json and work/. */
  stateDir?: string;
  /** Concurrent runs; further runs wait in FIFO order. */
  slots?: number;
  /** argv template; placeholders {sampler} {runJson} {outDir} {runId} {jobId}. */
  samplerCommand?: string[];
  /** Extra environment for sampler processes (default: where tsx finds the "@/" paths). */
  samplerEnv?: Record<string, string>;
  /** Time between SIGTERM and SIGKILL at the wall-time limit or on cancel. */
  killGraceMs?: number;
  /** If set, only this SSH user name is accepted. */
  user?: string | null;
  /** Name the node reports in health/whoami. */
  nodeName?: string;
  logger?: Logger;
}

/** Options with every default filled in and checked. */
export interface ResolvedOptions {
  host: string;
  port: number;
  stateDir: string;
  workRoot: string;
  slots: number;
  samplerCommand: string[];
  samplerEnv: Record<string, string>;
  killGraceMs: number;
  user: string | null;
  nodeName: string;
  logger: Logger;
}

const repoRoot = path.resolve(import.meta.dirname, "..", "..");

/**
 * The real built-in samplers CLI, run through the project's tsx (what node_modules/.bin/tsx
 * points at, called through this Node so the .bin shim and PATH do not matter).
 */
export const DEFAULT_SAMPLER_COMMAND: readonly string[] = [
  process.execPath,
  path.join(repoRoot, "node_modules", "tsx", "dist", "cli.mjs"),
  path.join(repoRoot, "cluster-fake", "samplers", "cli.ts"),
  "{sampler}",
  "{runJson}",
  "{outDir}",
];

/**
 * Samplers run with their work dir as cwd, outside the repo, so tsx would not find
 * tsconfig.json and its "@/" path alias on its own.
 */
export const DEFAULT_SAMPLER_ENV: Readonly<Record<string, string>> = {
  TSX_TSCONFIG_PATH: path.join(repoRoot, "tsconfig.json"),
};

export const DEFAULT_STATE_DIR = path.join(repoRoot, ".data", "cluster-fake");

function fail(field: string, message: string): never {
  throw new Error(`fake cluster option ${field}: ${message}`);
}

function intIn(field: string, value: number, min: number, max: number): number {
  if (!Number.isInteger(value) || value < min || value > max) {
    fail(field, `expected an integer in [${min}, ${max}], got ${String(value)}`);
  }
  return value;
}

/** Fill defaults and reject nonsense with the offending field named. */
export function resolveOptions(o: FakeClusterOptions = {}): ResolvedOptions {
  const stateDir = path.resolve(o.stateDir ?? DEFAULT_STATE_DIR);
  const samplerCommand = o.samplerCommand ?? [...DEFAULT_SAMPLER_COMMAND];
  if (!Array.isArray(samplerCommand) || samplerCommand.length === 0
      || samplerCommand.some((a) => typeof a !== "string" || a.length === 0)) {
    fail("samplerCommand", "expected a non-empty array of non-empty strings");
  }
  const host = o.host ?? "127.0.0.1";
  if (host !== "127.0.0.1" && host !== "::1" && host !== "localhost") {
    fail("host", `the fake cluster listens on loopback only, got ${host}`);
  }
  return {
    host,
    port: intIn("port", o.port ?? 2222, 0, 65535),
    stateDir,
    workRoot: path.join(stateDir, "work"),
    slots: intIn("slots", o.slots ?? 2, 1, 1024),
    samplerCommand,
    samplerEnv: o.samplerEnv ?? { ...DEFAULT_SAMPLER_ENV },
    killGraceMs: intIn("killGraceMs", o.killGraceMs ?? 5000, 0, 600_000),
    user: o.user ?? null,
    nodeName: o.nodeName ?? "ergodex-fake-node",
    logger: o.logger ?? pino({ level: "silent" }),
  };
}

function envInt(env: NodeJS.ProcessEnv, name: string): number | undefined {
  const raw = env[name];
  if (raw === undefined || raw === "") return undefined;
  const n = Number(raw);
  if (!Number.isInteger(n)) throw new Error(`environment ${name}: expected an integer, got "${raw}"`);
  return n;
}

/**
 * Options from the environment of the stand-alone process. The fake cluster is its
 * own process with its own few variables, so it parses them here rather than in lib/env.ts.
 */
export function optionsFromEnv(env: NodeJS.ProcessEnv): FakeClusterOptions {
  let samplerCommand: string[] | undefined;
  const cmd = env.ERGODEX_CLUSTER_SAMPLER_CMD;
  if (cmd) {
    try {
      samplerCommand = JSON.parse(cmd) as string[];
    } catch {
      throw new Error("environment ERGODEX_CLUSTER_SAMPLER_CMD: expected a JSON array of strings");
    }
  }
  return {
    port: envInt(env, "ERGODEX_CLUSTER_PORT"),
    stateDir: env.ERGODEX_CLUSTER_STATE_DIR || undefined,
    slots: envInt(env, "ERGODEX_CLUSTER_SLOTS"),
    killGraceMs: envInt(env, "ERGODEX_CLUSTER_KILL_GRACE_MS"),
    user: env.ERGODEX_CLUSTER_USER || undefined,
    samplerCommand,
  };
}
