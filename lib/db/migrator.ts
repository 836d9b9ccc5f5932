// The umzug migrator over migrations/*.ts, recording applied migrations in SequelizeMeta.
import path from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";
import type { QueryInterface, Sequelize } from "sequelize";
import { SequelizeStorage, Umzug, type LogFn } from "umzug";
import type { Migration } from "./migration";

const migrationsDir = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "../../migrations");

/** Migration file names: YYYYMMDDHHMMSS-verb-noun.ts. */
export const MIGRATION_NAME = /^\d{14}-[a-z0-9]+(-[a-z0-9]+)+\.ts$/;

type MigrationModule = { up?: Migration; down?: Migration };

/** An umzug instance migrating the database behind `sequelize`; logs through `log` if given. */
export function createMigrator(sequelize: Sequelize, log?: (message: string) => void): Umzug<QueryInterface> {
  // umzug logs objects like { event: "migrated", name, durationSeconds }.
  const event = (level: string): LogFn => (m) => {
    const secs = typeof m.durationSeconds === "number" ? ` (${m.durationSeconds.toFixed(2)} s)` : "";
    log?.(`${level === "info" ? "" : level + ": "}${String(m.event ?? "")} ${String(m.name ?? m.message ?? "")}${secs}`.trim());
  };
  return new Umzug<QueryInterface>({
    migrations: {
      glob: ["*.ts", { cwd: migrationsDir, ignore: ["*.d.ts"] }],
      // Imported from our own code rather than umzug's default resolver, so that whichever
      // loader runs us (tsx, vitest) also compiles the TypeScript migrations.
      resolve: ({ name, path: file, context }) => {
        if (!MIGRATION_NAME.test(name)) throw new Error(`migration file name "${name}" is not YYYYMMDDHHMMSS-verb-noun.ts`);
        const load = async (): Promise<Required<MigrationModule>> => {
          const mod = (await import(pathToFileURL(file!).href)) as MigrationModule;
          if (typeof mod.up !== "function" || typeof mod.down !== "function") {
            throw new Error(`migration ${name} must export both up and down functions`);
          }
          return mod as Required<MigrationModule>;
        };
        return {
          name,
          path: file,
          up: async () => (await load()).up({ name, path: file, context }),
          down: async () => (await load()).down({ name, path: file, context }),
        };
      },
    },
    context: sequelize.getQueryInterface(),
    storage: new SequelizeStorage({ sequelize, modelName: "SequelizeMeta", tableName: "sequelize_meta" }),
    logger: { info: event("info"), warn: event("warning"), error: event("error"), debug: () => {} },
  });
}
