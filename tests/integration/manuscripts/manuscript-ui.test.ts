// What the manuscript pages rely on beyond the provenance engineer's tests: an exhibit selects exactly the estimates
// its explorer view lists (sampler, tag, owner and parameter filters included), the page's preview counts what a
// freeze snapshots, the list marks the drafts a person may add exhibits to, editors are added through the action,
// and the history keeps the reason of an unfreeze.
import { beforeAll, describe, expect, it } from "vitest";
import * as actions from "@/lib/actions/manuscripts";
import { invokeAction } from "@/lib/auth/action";
import { loadIdentity, type Identity } from "@/lib/auth/identity";
import { writeEstimateVersions } from "@/lib/estimates/write-estimates";
import { parseExplorerQuery } from "@/lib/explorer/query";
import { queryEstimates } from "@/lib/explorer/query-estimates";
import { addExhibit, createManuscript } from "@/lib/manuscripts/edit-manuscript";
import { exhibitExplorerHref } from "@/lib/manuscripts/exhibit-link";
import { selectExhibitEstimates } from "@/lib/manuscripts/exhibit-query";
import { freezeManuscript, unfreezeManuscript } from "@/lib/manuscripts/freeze-manuscript";
import { listManuscripts, manuscriptDetail } from "@/lib/manuscripts/list-manuscripts";
import { db, type Group } from "@/models";
import { makeEnsemble, makeGroup, makeUser, useTestDatabase } from "@/tests/support/db";

useTestDatabase();
let group: Group;
let pi: Identity, researcher: Identity, researcher2: Identity, viewer: Identity;
const ensembles: string[] = [];
const audit = (who: Identity) => ({ actorId: who.userId, ip: "127.0.0.1", requestId: "test" });
const ident = async (id: string) => (await loadIdentity(id, "session"))!;

// Two ensembles of the group (different owners, one tagged), ising2d points at three temperatures and two sizes,
// plus one point whose T is a string (the explorer's numeric guard must skip it, not fail); run and point estimates of e and absM.
beforeAll(async () => {
  group = await makeGroup();
  const [p, r, r2, v] = [await makeUser("pi", group), await makeUser("researcher", group), await makeUser("researcher", group), await makeUser("viewer", group)];
  [pi, researcher, researcher2, viewer] = await Promise.all([p, r, r2, v].map((u) => ident(u.id)));
  const sampler = (await db().Sampler.findOne({ where: { name: "ising2d", version: "1.0.0" } }))!;
  for (const [owner, tags] of [[r, ["scan", "paper"]], [r2, ["scan"]]] as const) {
    const points = [2.1, 2.3, 2.5].flatMap((T) => [{ L: 8, T, algorithm: "metropolis" }, { L: 16, T, algorithm: "wolff" }]).concat([{ L: 8, T: "hot" as never, algorithm: "metropolis" }]);
    const { ensemble, runs, points: pts } = await makeEnsemble({ owner, group, sampler, cluster: null, points, replicas: 1, tags: [...tags] });
    ensembles.push(ensemble.id);
    await db().sequelize.transaction(async (t) => {
      for (const run of runs) {
        const pt = pts.find((x) => x.id === run.pointId)!;
        const rows = ["e", "absM"].map((observable, i) => ({ pointId: pt.id, ensembleId: ensemble.id, params: pt.params, observable, mean: -1 + i + Math.random() * 0.1, error: 0.01,
          tauInt: 1.5, tauIntError: 0.1, thermCut: 10, n: 400, window: 6, method: "gamma-wolff", analysisVersion: "test", chosenById: null, chosenAt: null }));
        await writeEstimateVersions("run", run.id, rows, t);
        await writeEstimateVersions("point", pt.id, rows, t);
      }
    });
  }
}, 60_000);

describe("an exhibit selects what its explorer view lists", () => {
  const views: [string, Record<string, unknown>][] = [
    ["one ensemble, one observable", { ensembleIds: [0], observable: "e" }],
    ["a tag", { tags: ["paper"], observable: "absM", scope: "run" }],
    ["an owner", { ownerIds: ["r2"], scope: "point" }],
    ["the sampler and a temperature range", { sampler: "ising2d", observable: "e", params: [{ name: "T", min: 2.2, max: 2.6 }] }],
    ["an exact size and an open-ended range", { observable: "e", params: [{ name: "L", eq: 16 }, { name: "T", max: 2.4 }], scope: "run" }],
  ];
  it.each(views)("%s", async (_name, raw) => {
    const q = { ...raw } as Record<string, unknown>;
    if (q.ensembleIds) q.ensembleIds = [ensembles[0]];
    if (q.ownerIds) q.ownerIds = [researcher2.userId];
    const explorer = await queryEstimates(pi, parseExplorerQuery({ ...q, pageSize: 500 }));
    const ids = await selectExhibitEstimates(group.id, q as never);
    expect(explorer.total).toBeGreaterThan(0);
    expect(new Set(ids)).toEqual(new Set(explorer.rows.map((r) => r.estimateId)));
    expect(ids).toHaveLength(explorer.total);
  });

  it("the exhibit's explorer link reopens the same filters", async () => {
    const q = { ensembleIds: [ensembles[1]], observable: "e", scope: "run" as const, params: [{ name: "T", min: 2.2 }], x: "T", groupBy: "param:L", sort: { column: "mean", dir: "asc" }, page: 3 };
    const href = exhibitExplorerHref(q);
    const sp = new URL(href, "http://x").searchParams;
    expect(sp.get("x")).toBe("T");
    expect(sp.get("groupBy")).toBe("param:L");
    expect(sp.get("page")).toBeNull();
    const back = parseExplorerQuery(new URLSearchParams([...sp].filter(([k]) => k !== "x" && k !== "groupBy")));
    expect(new Set(await selectExhibitEstimates(group.id, back as never))).toEqual(new Set(await selectExhibitEstimates(group.id, q)));
  });
});

describe("drafting, freezing and the page's data", () => {
  it("editors: the leading PI adds a researcher, who may then add exhibits; a viewer cannot be added; a researcher cannot add editors", async () => {
    const ms = await createManuscript(audit(pi), pi, { groupId: group.id, title: "Finite-size scaling" });
    const exhibit = { label: "Fig. 1", kind: "figure", query: { ensembleIds: [ensembles[0]], observable: "e", x: "T" } };
    expect(await invokeAction(actions.addExhibitAction, researcher, { id: ms.id, exhibit })).toMatchObject({ error: { code: "forbidden" } });
    expect(await invokeAction(actions.addCollaboratorAction, researcher, { id: ms.id, userId: researcher2.userId })).toMatchObject({ error: { code: "forbidden" } });
    expect(await invokeAction(actions.addCollaboratorAction, pi, { id: ms.id, userId: viewer.userId })).toMatchObject({ error: { code: "invalid" } });
    expect(await invokeAction(actions.addCollaboratorAction, pi, { id: ms.id, userId: researcher.userId })).toEqual({ data: { userId: researcher.userId } });
    expect(await invokeAction(actions.addExhibitAction, researcher, { id: ms.id, exhibit })).toHaveProperty("data.id");
    const mine = async (who: Identity) => (await listManuscripts(who)).find((r) => r.id === ms.id)!.mayEdit;
    expect([await mine(pi), await mine(researcher), await mine(researcher2), await mine(viewer)]).toEqual([true, true, false, false]);
    const d = await manuscriptDetail(pi, ms.id);
    expect(d.collaborators.map((c) => c.id)).toEqual([researcher.userId]);
    const added = (await db().User.findByPk(researcher.userId))!.name;
    expect(d.history.find((h) => h.action === "manuscript.collaborator.add")?.detail).toMatchObject({ userId: researcher.userId, userName: added });
  });

  it("the preview counts what a freeze then snapshots; unfreezing needs a reason and the history shows it", async () => {
    const ms = await createManuscript(audit(pi), pi, { groupId: group.id, title: "Preview paper" });
    await addExhibit(audit(pi), pi, ms.id, { label: "Fig. 2", kind: "figure", query: { observable: "e", scope: "point", x: "T", groupBy: "param:L", params: [{ name: "L", eq: 8 }] } });
    await addExhibit(audit(pi), pi, ms.id, { label: "Table 1", kind: "table", query: { ensembleIds: [ensembles[1]], observable: "absM", scope: "run" } });
    const draft = await manuscriptDetail(pi, ms.id);
    // L=8: three numeric temperatures and one string "hot" per ensemble, two ensembles
    expect(draft.exhibits.map((x) => [x.preview.from, x.preview.estimates])).toEqual([["current", 8], ["current", 7]]);
    expect(draft.exhibits[0].preview.series.map((s) => s.label)).toEqual(["e · L=8"]);
    expect(draft.exhibits[0].preview.series[0].points.map((p) => p.x)).toEqual([2.1, 2.1, 2.3, 2.3, 2.5, 2.5]);
    expect(draft.exhibits[0].preview.pointsLeftOut).toBe(2);
    await freezeManuscript(audit(pi), pi, ms.id);
    const frozen = await manuscriptDetail(viewer, ms.id);
    expect(frozen.may).toEqual({ edit: false, freeze: false, unfreeze: false, verify: false });
    for (const x of frozen.exhibits) {
      expect(x.preview.from).toBe("snapshot");
      expect(x.preview.estimates).toBe(x.snapshot!.estimates.length);
      expect(x.preview.files).toBe(x.snapshot!.files.length);
    }
    expect(frozen.exhibits.map((x) => x.preview.estimates)).toEqual([8, 7]);
    expect((await listManuscripts(pi)).find((r) => r.id === ms.id)!.mayEdit).toBe(false);
    await expect(unfreezeManuscript(audit(pi), pi, ms.id, "  ")).rejects.toMatchObject({ code: "invalid" });
    await unfreezeManuscript(audit(pi), pi, ms.id, "referee asked for L=32");
    const h = (await manuscriptDetail(pi, ms.id)).history;
    expect(h.map((e) => e.action)).toEqual(["manuscript.create", "manuscript.exhibit.add", "manuscript.exhibit.add", "manuscript.freeze", "manuscript.unfreeze"]);
    expect(h[4]).toMatchObject({ who: expect.stringMatching(/^pi /), detail: { reason: "referee asked for L=32" } });
  });
});
