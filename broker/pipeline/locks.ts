// Serialise all work on one cluster (dispatch, poll, cancel) and all collection of one run,
// within this process (a promise chain) and across broker processes (a PostgreSQL advisory
// lock held by a transaction of its own, so it goes away with a killed process's connection).
import { QueryTypes } from "sequelize";
import { db } from "@/models";

const chains = new Map<string, Promise<unknown>>();

async function inProcess<T>(key: string, fn: () => Promise<T>): Promise<T> {
  const previous = chains.get(key) ?? Promise.resolve();
  const next = previous.catch(() => {}).then(fn);
  chains.set(key, next);
  try {
    return await next;
  } finally {
    if (chains.get(key) === next) chains.delete(key);
  }
}

/**
 * Run fn holding the lock `key`. With wait: false, returns { ran: false } at once if another
 * process holds it. fn's own writes use their own transactions: the lock's transaction only holds.
 */
export async function withLock<T>(key: string, fn: () => Promise<T>, options: { wait?: boolean } = {}): Promise<{ ran: true; value: T } | { ran: false }> {
  const wait = options.wait ?? true;
  return inProcess(key, () => db().sequelize.transaction(async (transaction) => {
    const sql = wait ? "SELECT true AS got FROM (SELECT pg_advisory_xact_lock(hashtextextended($1, 0))) l" : "SELECT pg_try_advisory_xact_lock(hashtextextended($1, 0)) AS got";
    const [row] = await db().sequelize.query<{ got: boolean }>(sql, { bind: [key], transaction, type: QueryTypes.SELECT });
    if (!row.got) return { ran: false as const };
    return { ran: true as const, value: await fn() };
  }));
}
