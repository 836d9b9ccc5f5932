// tsx scripts/migrate.ts up|down|down-all|status [--db name] — apply or revert schema migrations.
import { databaseUrl, env } from "../lib/env";
import { createSequelize } from "../lib/db/sequelize";
import { createMigrator } from "../lib/db/migrator";

const USAGE = "usage: tsx scripts/migrate.ts up|down|down-all|status [--db name]";

function parseArgs(argv: string[]): { command: string; database: string } {
  let command: string | undefined;
  let database = env.pg.database;
  for (let i = 0; i < argv.length; i++) {
    const a = argv[i];
    if (a === "--db") {
      const v = argv[++i];
      if (!v) throw new Error(`--db needs a database name\n${USAGE}`);
      database = v;
    } else if (a.startsWith("--db=")) database = a.slice(5);
    else if (!command) command = a;
    else throw new Error(`unexpected argument "${a}"\n${USAGE}`);
  }
  if (!command || !["up", "down", "down-all", "status"].includes(command)) {
    throw new Error(`unknown or missing command "${command ?? ""}"\n${USAGE}`);
  }
  return { command, database };
}

async function main(): Promise<void> {
  const { command, database } = parseArgs(process.argv.slice(2));
  const sequelize = createSequelize(databaseUrl(database), { poolMax: 2 });
  const migrator = createMigrator(sequelize, (m) => console.log(m));
  try {
    if (command === "up") {
      const done = await migrator.up();
      console.log(done.length ? `${database}: applied ${done.length} migration(s)` : `${database}: already up to date`);
    } else if (command === "down") {
      const done = await migrator.down();
      console.log(done.length ? `${database}: reverted ${done[0].name}` : `${database}: nothing to revert`);
    } else if (command === "down-all") {
      const done = await migrator.down({ to: 0 });
      console.log(`${database}: reverted ${done.length} migration(s)`);
    } else {
      // Sequentially: each call creates the meta table if missing, and two at once would race.
      const executed = await migrator.executed();
      const pending = await migrator.pending();
      for (const m of executed) console.log(`  applied  ${m.name}`);
      for (const m of pending) console.log(`  pending  ${m.name}`);
      console.log(`${database}: ${executed.length} applied, ${pending.length} pending`);
    }
  } finally {
    await sequelize.close();
  }
}

main().catch((err: unknown) => {
  const e = err as Error & { cause?: unknown; original?: { code?: string } };
  const cause = e.cause instanceof Error ? `\n  caused by: ${e.cause.message}` : "";
  console.error(`migrate: ${e.message}${cause}`);
  process.exit(1);
});
