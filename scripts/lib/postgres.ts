// The private PostgreSQL cluster under .data/: server command line, readiness and provisioning.
import fs from "node:fs";
import path from "node:path";
import { execFileSync } from "node:child_process";
import pg from "pg";
import { env } from "../../lib/env";

function bindir(): string {
  for (const d of ["/usr/lib/postgresql/15/bin", ...safeList("/usr/lib/postgresql").map((v) => `/usr/lib/postgresql/${v}/bin`)]) {
    if (fs.existsSync(path.join(d, "postgres"))) return d;
  }
  throw new Error("PostgreSQL server binaries not found (apt-get install postgresql)");
}
function safeList(dir: string): string[] { try { return fs.readdirSync(dir); } catch { return []; } }

export const socketDir = () => path.join(path.dirname(env.pg.dataDir), "pg-socket");

function postgresIds(): { uid?: number; gid?: number } {
  if (process.getuid?.() !== 0) return {};
  const uid = Number(execFileSync("id", ["-u", "postgres"]).toString().trim());
  const gid = Number(execFileSync("id", ["-g", "postgres"]).toString().trim());
  return { uid, gid };
}

/** Command that runs the server in the foreground (as the postgres user when we are root). */
export function pgServerCommand() {
  const ids = postgresIds();
  const sock = socketDir();
  fs.mkdirSync(sock, { recursive: true, mode: 0o755 });
  if (ids.uid !== undefined) fs.chownSync(sock, ids.uid, ids.gid!);
  return {
    cmd: path.join(bindir(), "postgres"),
    args: ["-D", env.pg.dataDir, "-c", `port=${env.pg.port}`, "-c", "listen_addresses=127.0.0.1", "-c", `unix_socket_directories=${sock}`, "-c", "max_connections=200", "-c", "fsync=" + (env.isTest ? "off" : "on"), "-c", "log_min_messages=warning"],
    ...ids,
  };
}

function adminClient(): pg.Client {
  return new pg.Client({ host: socketDir(), port: env.pg.port, user: "postgres", database: "postgres" });
}

export async function waitForPostgres(timeoutMs = 60_000): Promise<void> {
  const t0 = Date.now();
  for (;;) {
    const c = adminClient();
    try { await c.connect(); await c.query("select 1"); await c.end(); return; } catch (err) {
      await c.end().catch(() => {});
      if (Date.now() - t0 > timeoutMs) throw err;
      await new Promise((r) => setTimeout(r, 250));
    }
  }
}

/** Create the application role and database if missing (role and database in separate statements). */
export async function provisionDatabase(database = env.pg.database): Promise<void> {
  const c = adminClient();
  await c.connect();
  try {
    const role = await c.query("select 1 from pg_roles where rolname = $1", [env.pg.user]);
    const ident = (s: string) => '"' + s.replace(/"/g, '""') + '"';
    const lit = (s: string) => "'" + s.replace(/'/g, "''") + "'";
    if (role.rowCount === 0) await c.query(`create role ${ident(env.pg.user)} login createdb password ${lit(env.pg.password)}`);
    const db = await c.query("select 1 from pg_database where datname = $1", [database]);
    if (db.rowCount === 0) await c.query(`create database ${ident(database)} owner ${ident(env.pg.user)}`);
  } finally {
    await c.end();
  }
}
