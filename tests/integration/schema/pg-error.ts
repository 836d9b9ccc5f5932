// What PostgreSQL said when it refused a statement: SQLSTATE and the constraint's name.
import { expect } from "vitest";

export type PgRefusal = { code: string; constraint?: string; message: string };

/** Await a promise that must be refused by the database and return PostgreSQL's reason. */
export async function refusal(promise: Promise<unknown>): Promise<PgRefusal> {
  let err: unknown;
  try {
    await promise;
  } catch (e) {
    err = e;
  }
  expect(err, "the database accepted a row it should refuse").toBeDefined();
  const e = err as { original?: Record<string, unknown>; parent?: Record<string, unknown>; message?: string; code?: string; constraint?: string };
  const pgErr = e.original ?? e.parent ?? (e as Record<string, unknown>);
  expect(pgErr.code, `not a PostgreSQL error: ${e.message}`).toMatch(/^[0-9A-Z]{5}$/);
  return { code: String(pgErr.code), constraint: pgErr.constraint as string | undefined, message: String(pgErr.message ?? e.message) };
}

/** SQLSTATE codes the tests expect. */
export const SQLSTATE = {
  check: "23514",
  unique: "23505",
  foreignKey: "23503",
  notNull: "23502",
  raised: "42501", // insufficient_privilege, raised by the append-only trigger
} as const;
