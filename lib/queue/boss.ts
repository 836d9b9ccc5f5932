// pg-boss in the app's own database (schema "pgboss"): one instance per process, started once.
// Web processes only send; the broker starts it as a worker (maintenance + cron scheduling).
import PgBoss from "pg-boss";
import { databaseUrl } from "@/lib/env";
import { getSequelize } from "@/lib/db/sequelize";
import { log } from "@/lib/log";
import { policyFor } from "./queues";

export const BOSS_SCHEMA = "pgboss";

type Slot = { boss: Promise<PgBoss>; database: string; worker: boolean; queues: Map<string, Promise<void>> };

// On globalThis: Next.js dev reloads re-evaluate modules and would start a second instance.
const slot = globalThis as typeof globalThis & { __ergodexBoss?: Slot };

/** The database the process-wide Sequelize points at: pg-boss follows it (tests switch it per file). */
function currentDatabase(): string {
  return getSequelize().config.database;
}

function create(database: string, worker: boolean): Slot {
  const boss = new PgBoss({
    connectionString: databaseUrl(database),
    schema: BOSS_SCHEMA,
    application_name: worker ? "ergodex-broker" : "ergodex-web",
    max: worker ? 6 : 3,
    // A sending process neither maintains (archive/expire) nor runs cron; the broker does both.
    supervise: worker,
    schedule: worker,
    migrate: true,
  });
  boss.on("error", (err) => log.error({ err, database }, "pg-boss error"));
  const started = boss.start().then(() => boss);
  const s: Slot = { boss: started, database, worker, queues: new Map() };
  started.catch(() => { if (slot.__ergodexBoss === s) slot.__ergodexBoss = undefined; });
  return s;
}

/**
 * The process's pg-boss, started on first use against the current app database. Call
 * startBoss({ worker: true }) first in a worker process; otherwise the instance only sends.
 */
export async function getBoss(): Promise<PgBoss> {
  const database = currentDatabase();
  const current = slot.__ergodexBoss;
  if (current && current.database === database) return current.boss;
  if (current) await stopBoss(); // the app database changed (tests): follow it
  slot.__ergodexBoss = create(database, false);
  return slot.__ergodexBoss.boss;
}

/** Start the process's pg-boss explicitly; `worker: true` enables maintenance and cron scheduling. */
export async function startBoss(options: { worker: boolean }): Promise<PgBoss> {
  const current = slot.__ergodexBoss;
  if (current && current.database === currentDatabase() && current.worker === options.worker) return current.boss;
  if (current) await stopBoss();
  slot.__ergodexBoss = create(currentDatabase(), options.worker);
  return slot.__ergodexBoss.boss;
}

/** Create a queue once per process (idempotent in the database too: create_queue ignores existing names). */
export async function ensureQueue(name: string): Promise<void> {
  const boss = await getBoss();
  const s = slot.__ergodexBoss!;
  let pending = s.queues.get(name);
  if (!pending) {
    pending = boss.createQueue(name, { name, policy: policyFor(name) });
    s.queues.set(name, pending);
    pending.catch(() => s.queues.delete(name));
  }
  await pending;
}

/** Stop the process's pg-boss (graceful: jobs in hand may finish within `timeoutMs`). */
export async function stopBoss(options: { graceful?: boolean; timeoutMs?: number } = {}): Promise<void> {
  const s = slot.__ergodexBoss;
  if (!s) return;
  slot.__ergodexBoss = undefined;
  const boss = await s.boss.catch(() => null);
  if (!boss) return;
  await boss.stop({ graceful: options.graceful ?? true, timeout: options.timeoutMs ?? 10_000, wait: true, close: true });
}
