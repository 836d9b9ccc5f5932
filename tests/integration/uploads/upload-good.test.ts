// Good uploads: a bundle as loose files, as a zip, twice (imported once), and a .tar.gz of two bundles (both imported).
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { loadIdentity, type Identity } from "@/lib/auth/identity";
import { depositUpload } from "@/lib/uploads/deposit-upload";
import { db } from "@/models";
import { makeGroup, makeUser, useTestDatabase } from "@/tests/support/db";
import { cleanupTemp, registerIsing } from "../importer/bundles";
import { filesOf, formRequest, goodBundle, leftovers, rawRequest, tarOf, testLimits, uploadCounts, zipOf } from "./support";

useTestDatabase();
afterAll(cleanupTemp);
const audit = { actorId: null, ip: null, requestId: "test" };
let who: Identity;
let groupId: string;
const limits = testLimits();

beforeAll(async () => {
  const group = await makeGroup();
  groupId = group.id;
  const user = await makeUser("researcher", group);
  await registerIsing();
  who = (await loadIdentity(user.id, "token"))!;
});

describe("uploading good bundles", () => {
  it("loose files of one bundle: accepted, recorded as uploaded by whom with the original names, run done in the group's archive ensemble", async () => {
    const dir = goodBundle("1001");
    const res = await depositUpload(formRequest(filesOf(dir, "my-run/")), who, audit, limits);
    expect(res.bundles).toHaveLength(1);
    const b = res.bundles[0];
    expect(b.status, JSON.stringify(b)).toBe("accepted");
    if (b.status !== "accepted") return;
    const imp = await db().Import.findByPk(b.importId);
    expect(imp).toMatchObject({ source: "upload", uploadedById: who.userId, state: "accepted", runId: b.runId });
    // The names as sent (folder prefix kept): every file of the folder, not only those the manifest lists.
    expect(imp!.originalNames).toEqual(filesOf(dir, "my-run/").map(([n]) => n));
    expect(imp!.originalNames).toContain("my-run/series.csv");
    const run = await db().Run.findByPk(b.runId, { include: [{ model: db().Ensemble, as: "ensemble" }] });
    expect(run).toMatchObject({ source: "upload", state: "done", seed: "1001" });
    expect(run!.ensemble).toMatchObject({ groupId, allocationId: null, clusterId: null });
    const point = await db().Estimate.count({ where: { scope: "point", pointId: run!.pointId } });
    expect(point).toBeGreaterThan(0);
    expect(leftovers(limits.dir)).toEqual([]);
  });

  it("the same bundle uploaded twice (as a zip) is imported once and reported as already imported", async () => {
    const dir = goodBundle("1002");
    const zip = await zipOf(filesOf(dir));
    const first = await depositUpload(rawRequest(zip, "application/zip", "r.zip"), who, audit, limits);
    expect(first.bundles.map((b) => b.status)).toEqual(["accepted"]);
    const before = await uploadCounts();
    const second = await depositUpload(rawRequest(zip, "application/zip", "r.zip"), who, audit, limits);
    expect(second.bundles.map((b) => b.status)).toEqual(["already-imported"]);
    expect(second.bundles[0]).toMatchObject({ importId: (first.bundles[0] as { importId: string }).importId });
    expect(await uploadCounts()).toEqual(before);
  });

  it("a .tar.gz with two good bundles imports both, into one archive ensemble, as two replicas of one point", async () => {
    const a = goodBundle("2001");
    const b = goodBundle("2002");
    const before = await uploadCounts();
    const tgz = await tarOf([...filesOf(a, "results/a/"), ...filesOf(b, "results/b/")].map(([name, data]) => ({ name, data })));
    const res = await depositUpload(rawRequest(tgz, "application/gzip", "two.tar.gz"), who, audit, limits);
    expect(res.bundles.map((x) => [x.bundle, x.status])).toEqual([["two.tar.gz:results/a", "accepted"], ["two.tar.gz:results/b", "accepted"]]);
    const after = await uploadCounts();
    expect(after.runs - before.runs).toBe(2);
    expect(after.accepted - before.accepted).toBe(2);
    expect(after.ensembles - before.ensembles).toBe(0); // the first test made the archive ensemble
    const runs = await db().Run.findAll({ where: { id: res.bundles.map((x) => (x as { runId: string }).runId) } });
    expect(new Set(runs.map((r) => r.pointId)).size).toBe(1);
    expect(runs.map((r) => r.replica).sort()).toEqual([runs[0].replica, runs[1].replica].sort());
    expect(runs[0].replica).not.toBe(runs[1].replica);
    expect(leftovers(limits.dir)).toEqual([]);
  });
});
