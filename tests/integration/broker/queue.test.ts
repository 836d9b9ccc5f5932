// lib/queue: jobs queued inside a Sequelize transaction live and die with it.
import { afterAll, describe, expect, it } from "vitest";
import { QueryTypes } from "sequelize";
import { useTestDatabase } from "@/tests/support/db";
import { enqueue } from "@/lib/queue/enqueue";
import { getBoss, stopBoss } from "@/lib/queue/boss";

const t = useTestDatabase();
afterAll(() => stopBoss({ graceful: false }));

async function jobsOf(name: string) {
  return t.sequelize.query<{ id: string; data: Record<string, unknown>; singleton_key: string | null; start_after: Date }>(
    `SELECT id, data, singleton_key, start_after FROM pgboss.job WHERE name = $1 ORDER BY created_on`,
    { bind: [name], type: QueryTypes.SELECT });
}

describe("enqueue", () => {
  it("creates the queue on first use and queues without a transaction", async () => {
    const id = await enqueue("check-allocation", { allocationId: "a1" });
    expect(id).toMatch(/^[0-9a-f-]{36}$/);
    const jobs = await jobsOf("check-allocation");
    expect(jobs.map((j) => j.data)).toEqual([{ allocationId: "a1" }]);
  });

  it("a job queued in a committed transaction exists, together with the caller's rows", async () => {
    let groupId = "";
    const id = await t.sequelize.transaction(async (transaction) => {
      const g = await makeGroupIn(transaction);
      groupId = g;
      return enqueue("dispatch-runs", { ensembleId: "e-commit" }, { transaction });
    });
    const jobs = await jobsOf("dispatch-runs");
    expect(jobs.find((j) => j.id === id)?.data).toEqual({ ensembleId: "e-commit" });
    expect(await t.models.Group.findByPk(groupId)).not.toBeNull();
  });

  it("a job queued in a rolled-back transaction is gone, with the caller's rows", async () => {
    let groupId = "";
    let jobId: string | null = null;
    await expect(t.sequelize.transaction(async (transaction) => {
      groupId = await makeGroupIn(transaction);
      jobId = await enqueue("dispatch-runs", { ensembleId: "e-rollback" }, { transaction });
      // Visible inside the transaction: it really went through the caller's connection.
      const inside = await t.sequelize.query(`SELECT 1 FROM pgboss.job WHERE id = $1`, { bind: [jobId], transaction, type: QueryTypes.SELECT });
      expect(inside).toHaveLength(1);
      throw new Error("roll back");
    })).rejects.toThrow("roll back");
    expect(jobId).not.toBeNull();
    const jobs = await jobsOf("dispatch-runs");
    expect(jobs.some((j) => j.id === jobId)).toBe(false);
    expect(jobs.some((j) => (j.data as { ensembleId?: string }).ensembleId === "e-rollback")).toBe(false);
    expect(await t.models.Group.findByPk(groupId)).toBeNull();
  });

  it("a singletonKey on the digest queue keeps one waiting job per key, delayed by startAfter", async () => {
    const before = Date.now();
    const first = await enqueue("failure-digest", { ensembleId: "e1" }, { singletonKey: "e1", startAfter: 60 });
    const second = await enqueue("failure-digest", { ensembleId: "e1" }, { singletonKey: "e1", startAfter: 60 });
    const other = await enqueue("failure-digest", { ensembleId: "e2" }, { singletonKey: "e2", startAfter: 60 });
    expect(first).not.toBeNull();
    expect(second).toBeNull();
    expect(other).not.toBeNull();
    const jobs = await jobsOf("failure-digest");
    expect(jobs.map((j) => j.singleton_key).sort()).toEqual(["e1", "e2"]);
    // startAfter 60 s: not fetchable now (allow 5 s of clock slack between Node and PostgreSQL).
    for (const j of jobs) expect(new Date(j.start_after).getTime()).toBeGreaterThan(before + 55_000);
    const boss = await getBoss();
    expect(await boss.fetch("failure-digest")).toEqual([]);
  });

  it("jobs of standard queues are not deduplicated", async () => {
    const a = await enqueue("collect-run", { runId: "r1" });
    const b = await enqueue("collect-run", { runId: "r1" });
    expect(a).not.toBe(b);
    expect((await jobsOf("collect-run")).length).toBe(2);
  });
});

async function makeGroupIn(transaction: import("sequelize").Transaction): Promise<string> {
  const slug = `g-${Math.random().toString(16).slice(2, 10)}`;
  const g = await t.models.Group.create({ slug, name: slug, institute: "Test" }, { transaction });
  return g.id;
}

describe("enqueue on a deduplicating queue without a key", () => {
  it("keys the job by its payload: one waiting check per allocation", async () => {
    const a = await enqueue("check-allocation", { allocationId: "a2" });
    const b = await enqueue("check-allocation", { allocationId: "a2" });
    const c = await enqueue("check-allocation", { allocationId: "a3" });
    expect(a).not.toBeNull();
    expect(b).toBeNull();
    expect(c).not.toBeNull();
  });
});
