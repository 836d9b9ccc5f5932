// Crash safety: the broker is SIGKILLed five times at seeded-random moments while a 40-run
// ensemble is in flight, and restarted each time. Every run must end exactly once, the node must
// never have been handed a run twice, and nothing may be imported twice.
import { afterAll, beforeAll, expect, it } from "vitest";
import { QueryTypes } from "sequelize";
import { createRng, uniform01 } from "@/lib/samplers/rng";
import { useTestDatabase } from "@/tests/support/db";
import { stopBoss } from "@/lib/queue/boss";
import { db } from "@/models";
import {
  BrokerProcess, freePort, isingSpec, ledgerOf, makeCatalogSamplers, makeClusterRow, makePeople, startNode, startSmtp,
  removeTempDirs, stateCounts, submit, tempDir, waitFor,
} from "./support";

const t = useTestDatabase();
let node: Awaited<ReturnType<typeof startNode>>;
let smtp: Awaited<ReturnType<typeof startSmtp>>;
let broker: BrokerProcess;

beforeAll(async () => {
  await makeCatalogSamplers();
  node = await startNode({ slots: 3 });
  smtp = await startSmtp();
  await makeClusterRow(node.node, node.clientKey, { name: "crashy", slotLimit: 8 });
  broker = new BrokerProcess(t, { dataDir: tempDir("crash"), smtpPort: smtp.port, healthPort: await freePort() });
});

afterAll(async () => {
  await broker?.kill();
  await Promise.all([node?.node.close(), smtp?.close(), stopBoss({ graceful: false })]);
  removeTempDirs();
});

const FINAL = ["done", "failed", "cancelled"];

it("SIGKILL ×5 during a 40-run ensemble: each run ends once, no duplicate submission, one import per run", async () => {
  const people = await makePeople();
  const sub = await submit(people.researcher, isingSpec("crashy", people.allocationName, {
    scan: [{ param: "T", linear: { from: 1.5, to: 3.4, points: 20 } }], replicas: 2, thermalization: 50, measurements: 200,
  }));
  expect(sub.runIds).toHaveLength(40);

  // Seeded, so a failure can be replayed: kill after 0.3–3 s of broker life each time.
  const rng = createRng("20251201");
  const seen: Record<string, number>[] = [];
  await broker.start();
  for (let k = 0; k < 5; k++) {
    const ms = 300 + Math.floor(uniform01(rng) * 2700);
    await new Promise((r) => setTimeout(r, ms));
    seen.push(await stateCounts(sub.ensembleId));
    await broker.kill();
    await broker.start();
  }
  console.log("run states at each SIGKILL:", JSON.stringify(seen));
  await waitFor("ensemble final", async () => (await db().Ensemble.findByPk(sub.ensembleId))!.state, (s) => s !== "active", 150_000, broker);
  expect(await stateCounts(sub.ensembleId)).toEqual({ done: 40 });
  // The kills landed while work was in flight (not all before dispatch or after the end).
  expect(seen.some((c) => (c.dispatched ?? 0) + (c.running ?? 0) + (c.collecting ?? 0) > 0)).toBe(true);

  // One event into a final state, and one into dispatched, per run.
  const events = await t.sequelize.query<{ run_id: string; to_state: string; n: string }>(
    `SELECT e.run_id, e.to_state, count(*) AS n FROM run_events e JOIN runs r ON r.id = e.run_id
     WHERE r.ensemble_id = $1 GROUP BY e.run_id, e.to_state`, { bind: [sub.ensembleId], type: QueryTypes.SELECT });
  for (const id of sub.runIds) {
    const mine = events.filter((e) => e.run_id === id);
    expect(mine.filter((e) => FINAL.includes(e.to_state)).map((e) => [e.to_state, Number(e.n)])).toEqual([["done", 1]]);
    expect(Number(mine.find((e) => e.to_state === "dispatched")?.n)).toBe(1);
  }

  // The node was handed each run exactly once: first attempt everywhere, 40 job numbers in all.
  const onNode = node.node.scheduler.report(sub.runIds, false);
  expect(onNode.unknown).toEqual([]);
  expect(onNode.runs.map((r) => r.attempt)).toEqual(sub.runIds.map(() => 1));
  expect(new Set(onNode.runs.map((r) => r.jobId)).size).toBe(40);
  expect(Math.max(...onNode.runs.map((r) => Number(r.jobId)))).toBe(40);

  // Nothing imported twice: one accepted import and 200 values of e per run.
  const imports = await t.sequelize.query<{ run_id: string; n: string }>(
    `SELECT run_id, count(*) AS n FROM imports WHERE run_id = ANY($1::uuid[]) GROUP BY run_id`, { bind: [sub.runIds], type: QueryTypes.SELECT });
  expect(imports.map((i) => Number(i.n))).toEqual(sub.runIds.map(() => 1));
  const values = await t.sequelize.query<{ run_id: string; n: string }>(
    `SELECT run_id, sum(cardinality(values)) AS n FROM series WHERE run_id = ANY($1::uuid[]) AND observable = 'e' GROUP BY run_id`,
    { bind: [sub.runIds], type: QueryTypes.SELECT });
  expect(values.map((v) => Number(v.n))).toEqual(sub.runIds.map(() => 200));

  // Settled once per run, and the ensemble's ledger balances.
  const entries = await t.sequelize.query<{ run_id: string; kind: string; n: string }>(
    `SELECT run_id, kind, count(*) AS n FROM ledger_entries WHERE ensemble_id = $1 AND run_id IS NOT NULL GROUP BY run_id, kind`,
    { bind: [sub.ensembleId], type: QueryTypes.SELECT });
  expect(entries.every((e) => Number(e.n) === 1)).toBe(true);
  const ledger = await ledgerOf(sub.ensembleId);
  expect(ledger.reserve).toBeCloseTo((ledger.charge ?? 0) + (ledger.release ?? 0), 4);
  console.log(`broker started ${broker.starts} times; ledger ${JSON.stringify(ledger)}`);
}, 240_000);
