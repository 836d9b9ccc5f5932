// Shared shape of a migration file: umzug's MigrationFn with Sequelize's QueryInterface as context.
import type { QueryInterface } from "sequelize";
import type { MigrationFn } from "umzug";

/** What every file in migrations/ exports as `up` and `down`. */
export type Migration = MigrationFn<QueryInterface>;

/**
 * Run a block of DDL as one statement batch. Without bind parameters pg uses the simple
 * query protocol, in which PostgreSQL runs a multi-statement string as one implicit
 * transaction: a migration that fails half-way leaves nothing behind.
 */
export async function runSql(queryInterface: QueryInterface, sql: string): Promise<void> {
  await queryInterface.sequelize.query(sql, { raw: true });
}
