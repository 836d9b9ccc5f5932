// Creates the migrated template database that integration tests clone (one database per test file).
import pg from "pg";
import { execFileSync } from "node:child_process";
import { env, databaseUrl } from "../lib/env";

const name = process.env.ERGODEX_PG_TEMPLATE_DB ?? "ergodex_template";
const c = new pg.Client({ connectionString: databaseUrl("postgres") });
await c.connect();
const exists = await c.query("select 1 from pg_database where datname = $1", [name]);
if (exists.rowCount === 0) await c.query(`create database "${name}"`);
await c.end();
execFileSync(process.execPath, ["--conditions=react-server", "--import", "tsx", "scripts/migrate.ts", "up", "--db", name], { stdio: "inherit", cwd: env.root });
