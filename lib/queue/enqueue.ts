// Queue a job, optionally inside the caller's Sequelize transaction so it commits or rolls back
// with the rows that asked for it (pg-boss send's `db` option runs its INSERT on that connection).
import { QueryTypes, type Transaction } from "sequelize";
import type PgBoss from "pg-boss";
import { getSequelize } from "@/lib/db/sequelize";
import { ensureQueue, getBoss } from "./boss";
import { policyFor } from "./queues";

export type EnqueueOptions = {
  /** Insert the job through this transaction: it exists only if the transaction commits. */
  transaction?: Transaction | null;
  /**
   * On "short" queues, at most one waiting job per key (later sends are dropped and return null);
   * the key defaults to the payload's JSON there.
   */
  singletonKey?: string;
  /** Delay in seconds, or a moment. */
  startAfter?: number | Date;
};

/** A pg-boss Db that runs statements on a Sequelize transaction's connection. */
export function transactionDb(transaction: Transaction): PgBoss.Db {
  const sequelize = (transaction as unknown as { sequelize?: ReturnType<typeof getSequelize> }).sequelize ?? getSequelize();
  return {
    async executeSql(text: string, values: unknown[] = []) {
      // Sequelize refuses an undefined bind value; pg-boss leaves unset options undefined (= NULL).
      const bind = values.map((v) => (v === undefined ? null : v));
      const rows = await sequelize.query(text, { bind, transaction, type: QueryTypes.SELECT, raw: true });
      return { rows: rows as unknown[] };
    },
  };
}

/**
 * Send job `name` with `data`. Returns the job id, or null when a waiting job with the same
 * singletonKey already exists on a deduplicating queue. The queue is created on first use.
 */
export async function enqueue(name: string, data: object, options: EnqueueOptions = {}): Promise<string | null> {
  await ensureQueue(name); // outside the caller's transaction: DDL must not roll back with it
  const boss = await getBoss();
  const send: PgBoss.SendOptions = {};
  const dedupes = policyFor(name) !== "standard";
  // On a deduplicating queue a job without a key would share the key "" with every other one:
  // the payload itself is the natural key (one waiting check per allocation, and so on).
  const key = options.singletonKey ?? (dedupes ? JSON.stringify(data) : undefined);
  if (key !== undefined) send.singletonKey = key;
  if (options.startAfter !== undefined) send.startAfter = options.startAfter;
  if (options.transaction) send.db = transactionDb(options.transaction);
  const id = await boss.send(name, data, send);
  if (id === null && !dedupes) {
    throw new Error(`pg-boss did not queue "${name}" (no such queue, or an id collision)`);
  }
  return id;
}
