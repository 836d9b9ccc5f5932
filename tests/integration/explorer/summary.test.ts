// explorer.estimate_rows (the summary of current estimates the explorer reads) stays exactly right: every writer's
// transaction keeps it, a rollback leaves it, ensemble edits reach it; sorts page through it in order; counts
// beyond the cap are labelled estimates; point estimates carry the replicas' N-weighted τ_int.
import { beforeAll, describe, expect, it } from "vitest";
import { QueryTypes } from "sequelize";
import { combineTauInt } from "@/lib/estimates/combine-tau-int";
import { computePointEstimates } from "@/lib/estimates/compute-point-estimates";
import { writeEstimateVersions } from "@/lib/estimates/write-estimates";
import { parseExplorerQuery } from "@/lib/explorer/query";
import { queryEstimates } from "@/lib/explorer/query-estimates";
import { db, type Estimate } from "@/models";
import { makeEnsemble, makeGroup, makeSampler, makeUser, useTestDatabase } from "@/tests/support/db";
import { seedArchive, type Seeded } from "./seed";

useTestDatabase();
let s: Seeded;
beforeAll(async () => {
  s = await seedArchive();
  // A third observable whose run estimates have no τ_int on one replica, so τ sorts have a tail.
  const runEstimates = s.estimates.filter((e) => e.scope === "run" && e.observable === "e");
  const more = await db().Estimate.bulkCreate(runEstimates.map((e, i) => ({
    scope: "run" as const, runId: e.runId, pointId: e.pointId, ensembleId: e.ensembleId, observable: "m2", mean: i, error: 0.1,
    tauInt: i % 3 === 0 ? null : 10 - (i % 7), n: 100, method: "jackknife", analysisVersion: "test-1", params: e.params,
  })), { returning: true });
  s.estimates.push(...more);
});

const q = (params: Record<string, string>) => parseExplorerQuery(new URLSearchParams({ pageSize: "500", ...params }));
const summary = () => db().sequelize.query<{ estimate_id: string; mean: number; tags: string[]; ensemble_name: string }>(
  `SELECT estimate_id, mean, tags, ensemble_name FROM explorer.estimate_rows`, { type: QueryTypes.SELECT });
const currentIds = async () => (await db().Estimate.findAll({ where: { isCurrent: true }, attributes: ["id"] })).map((e) => e.id).sort();

async function allPages(params: Record<string, string>, pageSize: number): Promise<string[]> {
  const out: string[] = [];
  for (let page = 1; ; page++) {
    const p = await queryEstimates(s.people.coordinator, q({ ...params, pageSize: String(pageSize), page: String(page) }));
    out.push(...p.rows.map((r) => r.estimateId));
    if (p.rows.length < pageSize) return out;
  }
}

describe("explorer.estimate_rows holds exactly the current estimates", () => {
  it("after bulk inserts: one row per current estimate, numeric parameters only in explorer.param_values", async () => {
    expect((await summary()).map((r) => r.estimate_id).sort()).toEqual(await currentIds());
    const values = await db().sequelize.query<{ name: string; n: string }>(`SELECT name, count(*) AS n FROM explorer.param_values GROUP BY name ORDER BY name`, { type: QueryTypes.SELECT });
    const numericT = s.estimates.filter((e) => typeof e.params.T === "number").length;
    expect(values.map((v) => [v.name, Number(v.n)])).toEqual([["L", s.estimates.length], ["T", numericT]]); // "metropolis" and "hot" have no row
  });

  it("a new version through lib/estimates replaces the old row in the same transaction; a rolled-back one leaves nothing", async () => {
    const old = s.estimates.find((e) => e.scope === "run" && e.observable === "absM")!;
    const next = { pointId: old.pointId, ensembleId: old.ensembleId, observable: "absM", mean: 123.5, error: 0.5, n: 10, method: "gamma-wolff", analysisVersion: "test-2", params: old.params };
    await expect(db().sequelize.transaction(async (transaction) => {
      await writeEstimateVersions("run", old.runId!, [next], transaction);
      throw new Error("abort");
    })).rejects.toThrow("abort");
    expect((await summary()).find((r) => r.estimate_id === old.id)?.mean).toBe(old.mean);
    const [made] = await db().sequelize.transaction((transaction) => writeEstimateVersions("run", old.runId!, [next], transaction));
    const rows = await summary();
    expect(rows.some((r) => r.estimate_id === old.id)).toBe(false);
    expect(rows.find((r) => r.estimate_id === made.id)?.mean).toBe(123.5);
    expect(rows.map((r) => r.estimate_id).sort()).toEqual(await currentIds());
    const page = await queryEstimates(s.people.owner, q({ scope: "run", observable: "absM", sort: "mean", dir: "desc", pageSize: "1" }));
    expect(page.rows[0].estimateId).toBe(made.id);
  });

  it("renaming and retagging an ensemble reaches its rows (tag filter and ensemble sort)", async () => {
    await db().Ensemble.update({ tags: ["renamed"], name: "AAA first" }, { where: { id: s.ensembles.other.id } });
    const tagged = await queryEstimates(s.people.coordinator, q({ tag: "renamed" }));
    expect(new Set(tagged.rows.map((r) => r.ensemble.id))).toEqual(new Set([s.ensembles.other.id]));
    expect(tagged.total).toBe(s.estimates.filter((e) => e.scope === "point" && e.ensembleId === s.ensembles.other.id).length);
    expect((await queryEstimates(s.people.coordinator, q({ tag: "scan", ensemble: s.ensembles.other.id }))).total).toBe(0);
    const byName = await queryEstimates(s.people.coordinator, q({ sort: "ensemble", dir: "asc", pageSize: "1" }));
    expect(byName.rows[0].ensemble.name).toBe("AAA first");
  });
});

describe("sorts page through the summary in exactly the right order", () => {
  const current = () => db().Estimate.findAll({ where: { isCurrent: true, scope: "run" } });
  const byId = (dir: 1 | -1) => (a: Estimate, b: Estimate) => (a.id < b.id ? -dir : a.id > b.id ? dir : 0);

  it("τ_int both ways: values in order (ties by id), missing last, across pages of 4", async () => {
    for (const dir of ["asc", "desc"] as const) {
      const sign = dir === "asc" ? 1 : -1;
      const rows = (await current()).filter((e) => e.observable === "m2");
      const want = [...rows.filter((e) => e.tauInt !== null).sort((a, b) => sign * (a.tauInt! - b.tauInt!) || byId(sign)(a, b)), ...rows.filter((e) => e.tauInt === null).sort(byId(sign))];
      expect(want.some((e) => e.tauInt === null)).toBe(true);
      expect(await allPages({ scope: "run", observable: "m2", sort: "tauInt", dir }, 4)).toEqual(want.map((e) => e.id));
    }
  });

  it("a parameter both ways: numbers numerically, then the string value, across pages of 3", async () => {
    for (const dir of ["asc", "desc"] as const) {
      const sign = dir === "asc" ? 1 : -1;
      const rows = (await current()).filter((e) => e.observable === "e");
      const num = rows.filter((e) => typeof e.params.T === "number").sort((a, b) => sign * ((a.params.T as number) - (b.params.T as number)) || byId(sign)(a, b));
      const text = rows.filter((e) => typeof e.params.T !== "number").sort(byId(sign));
      expect(text.length).toBeGreaterThan(0);
      expect(await allPages({ scope: "run", observable: "e", sort: "param:T", dir }, 3)).toEqual([...num, ...text].map((e) => e.id));
    }
  });
});

describe("counts", () => {
  it("exact up to the cap; beyond it the planner's estimate, flagged as one", async () => {
    const exact = await queryEstimates(s.people.coordinator, q({ scope: "run" }));
    const n = s.estimates.filter((e) => e.scope === "run").length; // all current: the rewritten absM row replaced its old one
    expect(exact).toMatchObject({ total: n, totalCapped: false, totalEstimated: false });
    const about = await queryEstimates(s.people.coordinator, q({ scope: "run" }), { countCap: 3 });
    expect(about.totalEstimated).toBe(true);
    expect(about.totalCapped).toBe(true);
    expect(about.total).toBeGreaterThan(3);
    expect(about.rows.length).toBe(n); // the page itself is exact
  });
});

describe("point estimates carry the replicas' N-weighted τ_int", () => {
  it("combineTauInt: Σnτ/Σn with σ = sqrt(Σ(nσ)²)/Σn; none (and why) when a replica has none", () => {
    const c = combineTauInt([{ tauInt: 2, tauIntError: 0.2, n: 1000 }, { tauInt: 4, tauIntError: 0.4, n: 3000 }]);
    expect(c.tauInt).toBeCloseTo(3.5, 12); // (2·1000 + 4·3000) / 4000
    expect(c.tauIntError).toBeCloseTo(Math.sqrt(200 ** 2 + 1200 ** 2) / 4000, 12);
    expect(combineTauInt([{ tauInt: 2, tauIntError: null, n: 10 }, { tauInt: 4, tauIntError: 0.1, n: 10 }])).toEqual({ tauInt: 3, tauIntError: null });
    expect(combineTauInt([{ tauInt: 2, tauIntError: 0.1, n: 10 }, { tauInt: null, tauIntError: null, n: 10 }])).toMatchObject({ tauInt: null, why: "1 of 2 replicas have no τ_int" });
    expect(() => combineTauInt([{ tauInt: NaN, tauIntError: null, n: 10 }])).toThrow(/replicas\[0\]\): τ_int must be finite/);
  });

  it("computePointEstimates stores it and the explorer shows it", async () => {
    const group = await makeGroup();
    const owner = await makeUser("researcher", group);
    const sampler = await makeSampler();
    const fx = await makeEnsemble({ owner, group, sampler, cluster: null, replicas: 2, points: [{ L: 8, T: 2.0 }] });
    const [p] = fx.points;
    await db().Run.update({ state: "done" }, { where: { ensembleId: fx.ensemble.id } });
    const base = { scope: "run" as const, pointId: p.id, ensembleId: fx.ensemble.id, observable: "e", error: 0.01, method: "gamma-wolff", analysisVersion: "test-1", params: p.params };
    await db().Estimate.bulkCreate([
      { ...base, runId: fx.runs[0].id, mean: -1.0, tauInt: 2, tauIntError: 0.2, n: 1000 },
      { ...base, runId: fx.runs[1].id, mean: -1.01, tauInt: 4, tauIntError: 0.4, n: 3000 },
    ]);
    const { estimates } = await computePointEstimates(p.id);
    expect(estimates[0].tauInt).toBeCloseTo(3.5, 12);
    const page = await queryEstimates(await import("@/lib/auth/identity").then(async (m) => (await m.loadIdentity(owner.id, "session"))!), q({ ensemble: fx.ensemble.id }));
    expect(page.rows.map((r) => [r.scope, r.tauInt])).toEqual([["point", estimates[0].tauInt]]);
    expect(page.rows[0].tauIntError).toBeCloseTo(Math.sqrt(200 ** 2 + 1200 ** 2) / 4000, 12);
  });
});
