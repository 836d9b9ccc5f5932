// Plot grouping (per ensemble, per value of a second parameter, replicas) and saved views, on the seeded archive.
import { beforeAll, describe, expect, it } from "vitest";
import { AppError } from "@/lib/errors";
import { exportPlot } from "@/lib/explorer/export";
import { plotSeries } from "@/lib/explorer/plot-series";
import { parseExplorerQuery } from "@/lib/explorer/query";
import { createSavedView, getSavedView, listSavedViews, savedViewTarget } from "@/lib/explorer/saved-views";
import { checkScope } from "@/lib/auth/scope";
import { db } from "@/models";
import { useTestDatabase } from "@/tests/support/db";
import { meanOf, seedArchive, type Seeded } from "./seed";

useTestDatabase();
let s: Seeded;
beforeAll(async () => { s = await seedArchive(); });
const audit = { actorId: null, ip: null, requestId: "test" };

describe("plotSeries", () => {
  it("one line per ensemble, points sorted by x with the estimates' means and errors, the non-numeric T skipped", async () => {
    const plot = await plotSeries(s.people.owner, { ...parseExplorerQuery({ observable: "e" }), x: "T", groupBy: "ensemble" });
    expect(plot.series.map((l) => l.key).sort()).toEqual([s.ensembles.scan.id, s.ensembles.big.id].sort());
    const scan = plot.series.find((l) => l.key === s.ensembles.scan.id)!;
    expect(scan.points.map((p) => p.x)).toEqual([2.0, 2.2, 2.4, 2.6]);
    expect(scan.points.map((p) => p.mean)).toEqual([2.0, 2.2, 2.4, 2.6].map((T) => meanOf("e", { T, L: 8 })));
    expect(scan.points.every((p) => p.error === 0.01)).toBe(true);
    expect(plot.skipped).toBe(1);
    // two replicas behind each point, their run estimates as stored
    expect(scan.points.every((p) => p.runs!.length === 2)).toBe(true);
    expect(scan.points[0].runs!.map((r) => r.mean).sort()).toEqual([meanOf("e", { T: 2, L: 8 }) + 0.001, meanOf("e", { T: 2, L: 8 }) + 0.002].sort());
  });

  it("one line per value of a second parameter, across ensembles and within scope (coordinator sees group B too)", async () => {
    const plot = await plotSeries(s.people.coordinator, { ...parseExplorerQuery({ observable: "absM" }), x: "T", groupBy: "param:L" });
    expect(plot.series.map((l) => l.label)).toEqual(["L = 16", "L = 8"]);
    expect(plot.series[0].points.map((p) => p.x)).toEqual([2.1, 2.3, 2.5]);
    expect(plot.series[1].points.map((p) => p.x)).toEqual([2.0, 2.2, 2.2, 2.4, 2.4, 2.6]); // scan and other share T = 2.2, 2.4
  });

  it("refuses an unknown x parameter and a plot without an observable", async () => {
    await expect(plotSeries(s.people.owner, { ...parseExplorerQuery({ observable: "e" }), x: "zeta", groupBy: "ensemble" })).rejects.toThrow(/unknown parameter "zeta"/);
    await expect(plotSeries(s.people.owner, { ...parseExplorerQuery({}), x: "T", groupBy: "ensemble" })).rejects.toThrow(/choose an observable/);
  });

  it("the plot export carries its rows with the line each belongs to", async () => {
    const q = { ...parseExplorerQuery({ observable: "e" }), x: "T", groupBy: "ensemble" as const };
    const plot = await plotSeries(s.people.owner, q);
    const csv = exportPlot(s.people.owner, q, plot, "csv").body.split("\r\n").filter((l) => l && !l.startsWith("# "));
    expect(csv.length - 1).toBe(plot.series.reduce((a, l) => a + l.points.length, 0));
    expect(csv[0].startsWith("line,x,")).toBe(true);
  });
});

describe("saved views", () => {
  it("are stored with their canonical query string, listed for the group, hidden from other groups", async () => {
    const view = await createSavedView(audit, s.people.owner, { name: "e vs T", query: { scope: "point", observable: "e", params: [{ name: "T", min: 2 }], sort: { column: "mean", dir: "asc" }, page: 1, pageSize: 50 }, plot: { x: "T", groupBy: "ensemble", logY: false } });
    expect(view.queryString).toBe("observable=e&p.T=2..&sort=mean&dir=asc");
    expect((await getSavedView(view.id)).plot).toEqual({ x: "T", groupBy: "ensemble", logY: false });
    expect((await listSavedViews(s.people.viewerA)).data.map((v) => v.id)).toContain(view.id);
    expect((await listSavedViews(s.people.viewerB)).data.map((v) => v.id)).not.toContain(view.id);
    const target = (await savedViewTarget(view.id))!;
    expect(() => checkScope(s.people.viewerB, target, "read")).toThrow(AppError);
    expect(() => checkScope(s.people.viewerA, target, "read")).not.toThrow();
    expect(await db().AuditEntry.count({ where: { action: "view.create", targetId: view.id } })).toBe(1);
  });

  it("refuses a view with a bad query field (path named) or a group the person is not in", async () => {
    await expect(createSavedView(audit, s.people.owner, { name: "x", query: { sort: { column: "1;drop", dir: "asc" } } })).rejects.toMatchObject({ code: "invalid" });
    const groupB = s.people.viewerB.groupIds[0];
    await expect(createSavedView(audit, s.people.owner, { name: "x", query: {}, groupId: groupB })).rejects.toMatchObject({ code: "not_found" });
  });
});
