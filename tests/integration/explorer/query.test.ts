// The explorer query against a seeded archive with known contents: filters, sorts, pages, scope, injection, exports.
import { beforeAll, describe, expect, it } from "vitest";
import { AppError } from "@/lib/errors";
import { exportTable } from "@/lib/explorer/export";
import { parseExplorerQuery, toSearchParams } from "@/lib/explorer/query";
import { queryEstimates } from "@/lib/explorer/query-estimates";
import { db, type Estimate } from "@/models";
import { useTestDatabase } from "@/tests/support/db";
import { seedArchive, type Seeded } from "./seed";

useTestDatabase();
let s: Seeded;
beforeAll(async () => { s = await seedArchive(); });

const q = (params: Record<string, string>) => parseExplorerQuery(new URLSearchParams({ pageSize: "500", ...params }));
const ids = (rows: { estimateId: string }[]) => rows.map((r) => r.estimateId);
const expected = (keep: (e: Estimate) => boolean) => s.estimates.filter(keep);
const T = (e: Estimate) => e.params.T as number | string;

describe("filters return exactly the right rows", () => {
  it("a parameter range, inclusive at both ends, skipping the point whose T is not a number", async () => {
    const page = await queryEstimates(s.people.owner, q({ observable: "e", "p.T": "2.2..2.4" }));
    const want = expected((e) => e.scope === "point" && e.observable === "e" && typeof T(e) === "number" && (T(e) as number) >= 2.2 && (T(e) as number) <= 2.4 && e.ensembleId !== s.ensembles.other.id);
    expect(want.length).toBe(3); // scan 2.2, 2.4 and big 2.3
    expect(new Set(ids(page.rows))).toEqual(new Set(want.map((e) => e.id)));
    expect(page.total).toBe(3);
  });

  it("combined filters: sampler, ensemble, tag, owner, exact L and an open-ended range on run estimates", async () => {
    const page = await queryEstimates(s.people.owner, q({
      scope: "run", observable: "absM", sampler: "ising2d", ensemble: `${s.ensembles.scan.id},${s.ensembles.big.id}`, tag: "prod",
      owner: s.people.owner.userId, "p.L": "16", "p.T": "2.2..",
    }));
    const want = expected((e) => e.scope === "run" && e.observable === "absM" && e.ensembleId === s.ensembles.big.id && (T(e) as number) >= 2.2);
    expect(want.length).toBe(4); // T 2.3 and 2.5, two replicas each
    expect(new Set(ids(page.rows))).toEqual(new Set(want.map((e) => e.id)));
  });

  it("exact string parameter and tag filters", async () => {
    const wolff = await queryEstimates(s.people.coordinator, q({ "p.algorithm": "wolff" }));
    expect(wolff.total).toBe(expected((e) => e.scope === "point" && e.params.algorithm === "wolff").length);
    const scanTag = await queryEstimates(s.people.coordinator, q({ tag: "scan", observable: "e" }));
    expect(new Set(scanTag.rows.map((r) => r.ensemble.id))).toEqual(new Set([s.ensembles.scan.id, s.ensembles.other.id]));
  });

  it("sorts by mean ascending and by a parameter descending (numbers numerically, a string value last)", async () => {
    const byMean = await queryEstimates(s.people.owner, q({ observable: "e", sort: "mean", dir: "asc" }));
    const means = byMean.rows.map((r) => r.mean);
    expect(means).toEqual([...means].sort((a, b) => a - b));
    expect(means.length).toBe(8);
    const byT = await queryEstimates(s.people.owner, q({ observable: "absM", sort: "param:T", dir: "desc" }));
    expect(byT.rows.map((r) => r.params.T)).toEqual([2.6, 2.5, 2.4, 2.3, 2.2, 2.1, 2.0, "hot"]);
  });

  it("pages tile the result: no row twice, none lost, in the sorted order", async () => {
    const all = await queryEstimates(s.people.coordinator, q({ scope: "run", sort: "tauInt", dir: "asc" }));
    const paged = [];
    for (let page = 1; page <= Math.ceil(all.total / 7); page++) paged.push(...(await queryEstimates(s.people.coordinator, q({ scope: "run", sort: "tauInt", dir: "asc", pageSize: "7", page: String(page) }))).rows);
    expect(all.total).toBe(expected((e) => e.scope === "run").length);
    expect(ids(paged)).toEqual(ids(all.rows));
  });

  it("survives the URL round trip unchanged", () => {
    const a = q({ observable: "e", "p.T": "2.2..2.4", "p.L": "8", sort: "param:T", dir: "asc", tag: "prod" });
    expect(parseExplorerQuery(toSearchParams(a))).toEqual(a);
  });
});

describe("group scope", () => {
  it("a viewer of another group sees only that group's rows; someone in no group sees none; a coordinator sees all", async () => {
    const b = await queryEstimates(s.people.viewerB, q({}));
    expect(b.total).toBe(expected((e) => e.scope === "point" && e.ensembleId === s.ensembles.other.id).length);
    expect(b.rows.every((r) => r.ensemble.id === s.ensembles.other.id)).toBe(true);
    expect((await queryEstimates(s.people.viewerB, q({ ensemble: s.ensembles.scan.id }))).total).toBe(0);
    expect((await queryEstimates(s.people.loner, q({}))).total).toBe(0);
    expect((await queryEstimates(s.people.coordinator, q({}))).total).toBe(expected((e) => e.scope === "point").length);
  });
});

describe("an injection attempt through every filter and sort field is harmless", () => {
  const evil = ["'; DROP TABLE estimates; --", "2) OR 1=1 --", "x\" OR \"1\"=\"1", "$1", "T') || pg_sleep(1) --"];
  const fields = ["sampler", "ensemble", "tag", "owner", "observable", "scope", "sort", "dir", "page", "pageSize", "columns", "p.T", "p.algorithm", "p.T'--"];

  it("each is refused with a 422 naming the field, or matches no row; the table is intact", async () => {
    const before = await db().Estimate.count();
    for (const field of fields) {
      for (const value of evil) {
        try {
          const page = await queryEstimates(s.people.owner, parseExplorerQuery(new URLSearchParams({ [field]: value })));
          expect(page.total, `${field}=${value}`).toBe(0);
        } catch (err) {
          expect(err, `${field}=${value}`).toBeInstanceOf(AppError);
          expect((err as AppError).status, `${field}=${value}`).toBe(422);
        }
      }
    }
    expect(await db().Estimate.count()).toBe(before);
    // a range whose ends are evil cannot reach SQL: they are not numbers
    expect(() => parseExplorerQuery(new URLSearchParams({ "p.T": "0..1 OR 1=1" }))).toThrow(/range max must be a finite number/);
  });
});

describe("exports match the table view row for row", () => {
  const parseCsv = (text: string) => {
    const lines = text.split("\r\n").filter((l) => l !== "");
    const header = lines.filter((l) => l.startsWith("# "));
    const [head, ...rows] = lines.filter((l) => !l.startsWith("# "));
    return { header, head: head.split(","), rows: rows.map((l) => l.split(",")) };
  };

  it("CSV: a header block naming query and analysis versions, then every page's rows in order with full precision", async () => {
    const view = q({ observable: "e", sort: "mean", dir: "desc", pageSize: "3" });
    const pages = [];
    for (let page = 1; page <= 3; page++) pages.push(...(await queryEstimates(s.people.owner, { ...view, page })).rows);
    const csv = parseCsv((await exportTable(s.people.owner, view, "csv")).body);
    expect(csv.header.join("\n")).toMatch(/# query: observable=e&sort=mean&dir=desc&pageSize=3/);
    expect(csv.header.join("\n")).toMatch(/# analysis versions: test-1/);
    expect(csv.header.join("\n")).toMatch(new RegExp(`# generated by: .*${s.people.owner.email}`));
    const col = (name: string) => csv.head.indexOf(name);
    expect(csv.rows.map((r) => r[col("estimate_id")])).toEqual(ids(pages));
    expect(csv.rows.map((r) => Number(r[col("mean")]))).toEqual(pages.map((r) => r.mean));
    expect(csv.rows.map((r) => r[col("param:T")])).toEqual(pages.map((r) => String(r.params.T)));
  });

  it("JSON: meta plus the same rows as the table", async () => {
    const view = q({ scope: "run", "p.T": "..2.3" });
    const json = JSON.parse((await exportTable(s.people.viewerA, view, "json")).body);
    expect(json.meta).toMatchObject({ kind: "table", query: "scope=run&p.T=..2.3&pageSize=500", analysisVersions: ["test-1"], truncated: false });
    expect(json.rows).toEqual(JSON.parse(JSON.stringify((await queryEstimates(s.people.viewerA, view)).rows)));
  });
});
