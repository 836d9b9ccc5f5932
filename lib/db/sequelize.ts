// The Sequelize connection: one factory, one process-wide instance.
import pg from "pg";
import { Sequelize, type Options } from "sequelize";
import { databaseUrl } from "@/lib/env";

/** Options a caller may set on a new connection; everything else is fixed project-wide. */
export type SequelizeOptions = {
  /** false (default) or a function receiving each SQL statement. */
  logging?: false | ((sql: string) => void);
  /** Largest number of pooled connections (default 10). */
  poolMax?: number;
};

/** A new Sequelize instance on PostgreSQL (defaults to the configured database). */
export function createSequelize(url: string = databaseUrl(), options: SequelizeOptions = {}): Sequelize {
  const config: Options = {
    dialect: "postgres",
    // Handing pg over explicitly keeps bundlers (Next.js) from having to resolve it dynamically.
    dialectModule: pg,
    logging: options.logging ?? false,
    pool: { max: options.poolMax ?? 10, min: 0, idle: 10_000, acquire: 30_000 },
    define: { underscored: true, freezeTableName: false },
  };
  return new Sequelize(url, config);
}

// Cached on globalThis, not in module scope: Next.js dev reloads re-evaluate modules and
// would otherwise open a new pool on every edit.
const slot = globalThis as typeof globalThis & { __ergodexSequelize?: Sequelize };

/** The process-wide Sequelize instance, created from lib/env.ts on first use. */
export function getSequelize(): Sequelize {
  slot.__ergodexSequelize ??= createSequelize();
  return slot.__ergodexSequelize;
}

/**
 * Replace the process-wide instance (integration tests point it at their own database)
 * and return the previous one so it can be restored. Does not close either instance.
 */
export function setSequelize(instance: Sequelize | undefined): Sequelize | undefined {
  const previous = slot.__ergodexSequelize;
  slot.__ergodexSequelize = instance;
  return previous;
}
