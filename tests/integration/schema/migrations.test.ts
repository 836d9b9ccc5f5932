// Migrations go all the way down and up again on a scratch database, and the models match the tables.
import fs from "node:fs";
import path from "node:path";
import { execFileSync } from "node:child_process";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { QueryTypes, type Sequelize } from "sequelize";
import { createSequelize } from "@/lib/db/sequelize";
import { createMigrator, MIGRATION_NAME } from "@/lib/db/migrator";
import { databaseUrl, env } from "@/lib/env";
import { initModels } from "@/models";
import { createDatabaseFrom, dropDatabase } from "../../support/db";

const migrationFiles = fs.readdirSync(path.join(env.root, "migrations")).filter((f) => f.endsWith(".ts")).sort();
let name: string;
let sequelize: Sequelize;

beforeAll(async () => {
  name = await createDatabaseFrom(null, "ergodex_mig"); // empty: no template, no migrations
  sequelize = createSequelize(databaseUrl(name), { poolMax: 2 });
});
afterAll(async () => {
  await sequelize?.close();
  if (name) await dropDatabase(name);
});

const rows = <T extends object>(sql: string): Promise<T[]> => sequelize.query<T>(sql, { type: QueryTypes.SELECT });

/** Everything a migration can create in the public schema, as sorted text lines. */
async function schemaSnapshot(): Promise<string[]> {
  const parts = await Promise.all([
    rows<{ l: string }>(`SELECT table_name || '.' || column_name || ' ' || data_type || ' ' || is_nullable || ' ' || coalesce(column_default, '') AS l
      FROM information_schema.columns WHERE table_schema = 'public'`),
    rows<{ l: string }>(`SELECT conrelid::regclass || ' ' || conname || ' ' || pg_get_constraintdef(oid) AS l
      FROM pg_constraint WHERE connamespace = 'public'::regnamespace`),
    rows<{ l: string }>(`SELECT indexdef AS l FROM pg_indexes WHERE schemaname = 'public'`),
    rows<{ l: string }>(`SELECT tgrelid::regclass || ' ' || tgname AS l FROM pg_trigger WHERE NOT tgisinternal`),
    rows<{ l: string }>(`SELECT 'view ' || viewname || ' ' || definition AS l FROM pg_views WHERE schemaname = 'public'`),
    rows<{ l: string }>(`SELECT 'function ' || proname AS l FROM pg_proc WHERE pronamespace = 'public'::regnamespace`),
  ]);
  return parts.flat().map((r) => r.l).sort();
}

describe("migrations", () => {
  it("are named YYYYMMDDHHMMSS-verb-noun.ts", () => {
    expect(migrationFiles.length).toBeGreaterThanOrEqual(9);
    for (const f of migrationFiles) expect(f).toMatch(MIGRATION_NAME);
  });

  it("go up, all the way down to nothing but the umzug meta table, and up again to the same schema", async () => {
    const migrator = createMigrator(sequelize);
    expect((await migrator.up()).map((m) => m.name)).toEqual(migrationFiles);
    const first = await schemaSnapshot();
    expect(first.some((l) => l.startsWith("audit_entries audit_entries_append_only"))).toBe(true);
    expect(first.some((l) => l.startsWith("view allocation_balances"))).toBe(true);

    expect((await migrator.down({ to: 0 })).length).toBe(migrationFiles.length);
    // Cast and renamed: Sequelize reshapes results of queries on information_schema.tables.
    const tables = await rows<{ table_name: string }>("SELECT table_name::text AS table_name FROM information_schema.tables WHERE table_schema = 'public'");
    expect(tables.map((r) => r.table_name)).toEqual(["sequelize_meta"]);
    expect((await schemaSnapshot()).filter((l) => !l.includes("sequelize_meta"))).toEqual([]);
    expect(await migrator.executed()).toEqual([]);

    await migrator.up();
    expect(await schemaSnapshot()).toEqual(first);
  });

  it("are reported by the CLI as all applied", () => {
    const out = execFileSync(process.execPath, ["--import", "tsx", "scripts/migrate.ts", "status", "--db", name], { cwd: env.root, encoding: "utf8" });
    expect(out).toContain(`${name}: ${migrationFiles.length} applied, 0 pending`);
  });
});

describe("models and tables agree", () => {
  it("every model attribute is a column of its table and every column is a model attribute", async () => {
    const models = initModels(sequelize);
    const columns = await rows<{ table_name: string; column_name: string; is_nullable: string }>(
      "SELECT table_name::text AS table_name, column_name::text AS column_name, is_nullable::text AS is_nullable FROM information_schema.columns WHERE table_schema = 'public' AND table_name <> 'sequelize_meta'");
    const byTable = new Map<string, Map<string, string>>();
    for (const c of columns) {
      if (!byTable.has(c.table_name)) byTable.set(c.table_name, new Map());
      byTable.get(c.table_name)!.set(c.column_name, c.is_nullable);
    }
    const views = new Set(["allocation_balances"]);
    const modelTables = new Set<string>();
    for (const [key, model] of Object.entries(models)) {
      if (key === "sequelize") continue;
      const M = model as (typeof models)["User"];
      const table = M.getTableName() as string;
      modelTables.add(table);
      const cols = byTable.get(table);
      expect(cols, `table ${table} of ${key}`).toBeDefined();
      const attrs = Object.values(M.getAttributes());
      const fields = attrs.map((a) => a.field!).sort();
      expect(fields, `${key} fields vs ${table} columns`).toEqual([...cols!.keys()].sort());
      for (const a of attrs) {
        // A NOT NULL column must not be optional-null in the model (defaults aside).
        if (cols!.get(a.field!) === "NO" && a.allowNull === true) throw new Error(`${key} attribute for ${a.field} allows null but ${table}.${a.field} is NOT NULL`);
      }
    }
    expect([...byTable.keys()].filter((t) => !views.has(t) && !modelTables.has(t))).toEqual([]);
  });
});
