// Foreground supervisor for `npm start` (and the e2e stack of `npm test`): starts PostgreSQL,
// prepares the database, then the fake cluster, fake SMTP, broker and web app, with prefixed logs.
// Every child's PID is written under .data/run/ so `npm stop` can stop them by PID.
import { spawn, type ChildProcess } from "node:child_process";
import fs from "node:fs";
import path from "node:path";
import { env } from "../lib/env";
import { pgServerCommand, waitForPostgres, provisionDatabase } from "./lib/postgres";

// Node-side processes load TypeScript in-process with tsx, under the "react-server" export condition so that
// lib/ modules marked `import "server-only"` (never to reach a browser bundle) load on the server as they do in Next.
const NODE_TS = ["--conditions=react-server", "--import", "tsx"];

type Service = { name: string; color: number; cmd: string; args: string[]; uid?: number; gid?: number; extraEnv?: Record<string, string>; stopSignal?: NodeJS.Signals; ready?: () => Promise<void> };

const runDir = path.join(env.dataDir, "run");
fs.mkdirSync(runDir, { recursive: true });
const children = new Map<string, ChildProcess>();
let stopping = false;

function prefix(name: string, color: number, chunk: Buffer, stream: NodeJS.WriteStream) {
  const tag = `\x1b[${color}m${name.padEnd(8)}|\x1b[0m `;
  for (const line of chunk.toString().split("\n")) if (line.trim()) stream.write(tag + line + "\n");
}

function say(msg: string) { process.stdout.write(`\x1b[1;37msupervise|\x1b[0m ${msg}\n`); }

async function start(s: Service): Promise<void> {
  const child = spawn(s.cmd, s.args, {
    cwd: env.root,
    env: { ...process.env, ...s.extraEnv },
    stdio: ["ignore", "pipe", "pipe"],
    uid: s.uid,
    gid: s.gid,
  });
  children.set(s.name, child);
  if (child.pid) fs.writeFileSync(path.join(runDir, `${s.name}.pid`), String(child.pid));
  child.stdout!.on("data", (c: Buffer) => prefix(s.name, s.color, c, process.stdout));
  child.stderr!.on("data", (c: Buffer) => prefix(s.name, s.color, c, process.stderr));
  child.on("exit", (code, signal) => {
    children.delete(s.name);
    fs.rmSync(path.join(runDir, `${s.name}.pid`), { force: true });
    if (!stopping) {
      say(`${s.name} exited unexpectedly (code ${code}, signal ${signal}); stopping everything`);
      void shutdown(1);
    }
  });
  if (s.ready) await s.ready();
  say(`${s.name} is up (pid ${child.pid})`);
}

/** One-shot step (migrate, seed) that must succeed before the services start. */
function task(name: string, args: string[]): Promise<void> {
  return new Promise((resolve, reject) => {
    const child = spawn(process.execPath, [...NODE_TS, ...args], { cwd: env.root, stdio: ["ignore", "pipe", "pipe"] });
    child.stdout!.on("data", (c: Buffer) => prefix(name, 36, c, process.stdout));
    child.stderr!.on("data", (c: Buffer) => prefix(name, 36, c, process.stderr));
    child.on("exit", (code) => (code === 0 ? resolve() : reject(new Error(`${name} failed with exit code ${code}`))));
  });
}

const order = ["web", "broker", "smtp", "cluster", "postgres"];
async function shutdown(code: number) {
  if (stopping) return;
  stopping = true;
  say("stopping");
  for (const name of order) {
    const child = children.get(name);
    if (!child) continue;
    const exited = new Promise((r) => child.once("exit", r));
    child.kill(name === "postgres" ? "SIGINT" : "SIGTERM"); // SIGINT = postgres "fast" shutdown
    const timer = setTimeout(() => child.kill("SIGKILL"), 15_000);
    await exited;
    clearTimeout(timer);
    say(`${name} stopped`);
  }
  fs.rmSync(path.join(runDir, "supervisor.pid"), { force: true });
  process.exit(code);
}

async function waitHttp(url: string, timeoutMs = 60_000) {
  const t0 = Date.now();
  while (Date.now() - t0 < timeoutMs) {
    try { const r = await fetch(url); if (r.status < 500) return; } catch { /* not yet */ }
    await new Promise((r) => setTimeout(r, 300));
  }
  throw new Error(`${url} did not answer within ${timeoutMs} ms`);
}

async function main() {
  fs.writeFileSync(path.join(runDir, "supervisor.pid"), String(process.pid));
  process.on("SIGINT", () => void shutdown(0));
  process.on("SIGTERM", () => void shutdown(0));
  const pg = pgServerCommand();
  await start({ name: "postgres", color: 35, ...pg, ready: () => waitForPostgres() });
  await provisionDatabase();
  await task("migrate", ["scripts/migrate.ts", "up"]);
  await task("seed", ["scripts/seed.ts"]);
  const optional: Service[] = [
    { name: "cluster", color: 33, cmd: process.execPath, args: [...NODE_TS, "cluster-fake/index.ts"], extraEnv: { ERGODEX_CLUSTER_STATE_DIR: env.cluster.stateDir } },
    { name: "smtp", color: 32, cmd: process.execPath, args: [...NODE_TS, "scripts/fake-smtp.ts"] },
    { name: "broker", color: 34, cmd: process.execPath, args: [...NODE_TS, "broker/index.ts"] },
  ].filter((s) => fs.existsSync(path.join(env.root, s.args[NODE_TS.length])));
  for (const s of optional) await start(s);
  await start({
    name: "web", color: 92, cmd: process.execPath,
    args: [path.join(env.root, "node_modules/next/dist/bin/next"), "start", "-H", env.web.host, "-p", String(env.web.port)],
    extraEnv: { NEXT_TELEMETRY_DISABLED: "1", NODE_ENV: "production", NEXTAUTH_URL: env.appUrl },
    ready: () => waitHttp(`${env.appUrl}/api/health`),
  });
  say(`Ergodex is ready at ${env.appUrl}  (Ctrl-C or \`npm stop\` stops it)`);
}

main().catch((err) => { say(`start failed: ${err instanceof Error ? err.message : err}`); void shutdown(1); });
