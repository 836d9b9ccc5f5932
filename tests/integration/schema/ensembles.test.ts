// Ensembles, points, runs and their results refuse bad rows at the database.
import { beforeAll, describe, expect, it } from "vitest";
import { makeAllocation, makeEnsemble, makeGroup, makeUser, useTestDatabase, type EnsembleFixture } from "../../support/db";
import type { Group, User } from "@/models";
import { refusal, SQLSTATE } from "./pg-error";

const t = useTestDatabase();
let group: Group;
let owner: User;
let fx: EnsembleFixture;
const hex = (c: string) => c.repeat(64);

beforeAll(async () => {
  group = await makeGroup();
  owner = await makeUser("researcher", group);
  fx = await makeEnsemble({ owner, group, allocation: await makeAllocation(group, 1000), reserveCoreHours: 40 });
});

describe("ensembles and parameter points", () => {
  it("keeps the spec, tags and numeric reservation as given", async () => {
    const e = await t.models.Ensemble.findByPk(fx.ensemble.id, { include: ["points", "runs", "sampler"] });
    expect(e!.points!.length).toBe(2);
    expect(e!.runs!.length).toBe(4);
    expect(e!.reservedCoreHours).toBe(40);
    expect(e!.sampler!.name).toBe("ising2d");
    expect(e!.state).toBe("active");
  });

  it("finds ensembles by tag and points by parameter value", async () => {
    const tagged = await makeEnsemble({ owner, group, cluster: null, tags: ["critical", "L8"] });
    const [byTag] = await t.sequelize.query("SELECT id FROM ensembles WHERE tags @> ARRAY['critical']");
    expect(byTag).toEqual([{ id: tagged.ensemble.id }]);
    const [byParam] = await t.sequelize.query(`SELECT point_index FROM parameter_points WHERE ensemble_id = $1 AND params @> '{"T": 2.5}'`, { bind: [fx.ensemble.id] });
    expect(byParam).toEqual([{ point_index: 1 }]);
  });

  it("refuses an unknown ensemble state, a malformed spec hash and a master seed that is not a u64", async () => {
    const base = fx.ensemble.get({ plain: true });
    const { id: _id, createdAt: _c, updatedAt: _u, ...attrs } = base;
    const E = t.models.Ensemble;
    expect(await refusal(E.create({ ...attrs, state: "paused" as never }))).toMatchObject({ code: SQLSTATE.check, constraint: "ensembles_state_check" });
    expect(await refusal(E.create({ ...attrs, specHash: "ABC" }))).toMatchObject({ constraint: "ensembles_spec_hash_check" });
    // 2^64 is one more than the largest unsigned 64-bit integer.
    expect(await refusal(E.create({ ...attrs, masterSeed: "18446744073709551616" }))).toMatchObject({ constraint: "ensembles_master_seed_check" });
    await expect(E.create({ ...attrs, masterSeed: "18446744073709551615" })).resolves.toBeTruthy();
  });

  it("refuses a duplicate point index within an ensemble", async () => {
    expect(await refusal(t.models.ParameterPoint.create({ ensembleId: fx.ensemble.id, pointIndex: 0, params: { L: 16 } })))
      .toMatchObject({ code: SQLSTATE.unique, constraint: "parameter_points_ensemble_id_point_index_key" });
  });
});

describe("runs", () => {
  const runAttrs = () => ({ ensembleId: fx.ensemble.id, pointId: fx.points[0].id, replica: 99, seed: "42" });

  it("refuses an unknown state, a bad seed string and progress outside [0, 1]", async () => {
    const R = t.models.Run;
    expect(await refusal(R.create({ ...runAttrs(), state: "lost" as never }))).toMatchObject({ code: SQLSTATE.check, constraint: "runs_state_check" });
    for (const seed of ["-1", "12a", "", "1".repeat(21), "99999999999999999999"]) {
      expect(await refusal(R.create({ ...runAttrs(), seed })), `seed "${seed}"`).toMatchObject({ code: SQLSTATE.check, constraint: "runs_seed_check" });
    }
    expect(await refusal(R.create({ ...runAttrs(), progress: 1.01 }))).toMatchObject({ constraint: "runs_progress_check" });
    expect(await refusal(R.create({ ...runAttrs(), source: "email" as never }))).toMatchObject({ constraint: "runs_source_check" });
  });

  it("refuses a second run with the same (point, replica)", async () => {
    expect(await refusal(t.models.Run.create({ ...runAttrs(), replica: 0 })))
      .toMatchObject({ code: SQLSTATE.unique, constraint: "runs_point_id_replica_key" });
  });

  it("refuses a failed run without a reason, a reason on a running run, and an unknown reason", async () => {
    const R = t.models.Run;
    expect(await refusal(R.create({ ...runAttrs(), state: "failed" }))).toMatchObject({ constraint: "runs_failure_reason" });
    expect(await refusal(R.create({ ...runAttrs(), state: "running", failureReason: "node_lost" }))).toMatchObject({ constraint: "runs_failure_reason" });
    expect(await refusal(R.create({ ...runAttrs(), state: "failed", failureReason: "gremlins" as never }))).toMatchObject({ constraint: "runs_failure_reason_check" });
    await expect(R.create({ ...runAttrs(), state: "failed", failureReason: "wall_time_exceeded" })).resolves.toBeTruthy();
  });

  it("refuses a run event with an unknown state or no cause", async () => {
    const RE = t.models.RunEvent;
    expect(await refusal(RE.create({ runId: fx.runs[0].id, fromState: "queued", toState: "vanished" as never, cause: "x" }))).toMatchObject({ constraint: "run_events_to_state_check" });
    expect(await refusal(RE.create({ runId: fx.runs[0].id, fromState: null, toState: "queued", cause: "" }))).toMatchObject({ constraint: "run_events_cause_check" });
  });
});

describe("archive, series and estimates", () => {
  it("refuses an artifact whose key is not a sha256, and a run file pointing to no artifact", async () => {
    expect(await refusal(t.models.Artifact.create({ sha256: "xyz", bytes: 1, mediaType: "text/csv", storagePath: "a" }))).toMatchObject({ constraint: "artifacts_sha256_check" });
    const a = await t.models.Artifact.create({ sha256: hex("a"), bytes: 5_000_000_000, mediaType: "application/octet-stream", storagePath: "aa/aaaa" });
    expect((await t.models.Artifact.findByPk(a.sha256))!.bytes).toBe(5_000_000_000);
    expect(await refusal(t.models.RunArtifact.create({ runId: fx.runs[0].id, path: "series.csv", artifactSha256: hex("b"), role: "series" })))
      .toMatchObject({ code: SQLSTATE.foreignKey, constraint: "run_artifacts_artifact_sha256_fkey" });
    await t.models.RunArtifact.create({ runId: fx.runs[0].id, path: "series.csv", artifactSha256: hex("a"), role: "series" });
    expect(await refusal(t.models.RunArtifact.create({ runId: fx.runs[0].id, path: "series.csv", artifactSha256: hex("a"), role: "extra" })))
      .toMatchObject({ code: SQLSTATE.unique, constraint: "run_artifacts_pkey" });
    expect(await refusal(t.models.RunArtifact.create({ runId: fx.runs[0].id, path: "../etc/passwd", artifactSha256: hex("a"), role: "extra" })))
      .toMatchObject({ constraint: "run_artifacts_path_check" });
  });

  it("makes importing the same bundle twice a unique violation, and a rejection carry its reason", async () => {
    const I = t.models.Import;
    await I.create({ runId: fx.runs[0].id, source: "cluster", bundleHash: hex("c"), state: "accepted", importerVersion: "1" });
    expect(await refusal(I.create({ runId: fx.runs[0].id, source: "cluster", bundleHash: hex("c"), state: "accepted", importerVersion: "1" })))
      .toMatchObject({ code: SQLSTATE.unique, constraint: "imports_bundle_hash_key" });
    expect(await refusal(I.create({ source: "upload", bundleHash: hex("d"), state: "rejected", importerVersion: "1" }))).toMatchObject({ constraint: "imports_reject_reason" });
  });

  it("stores series chunks as float8 arrays and refuses an empty chunk", async () => {
    const values = [-1.5, 0.25, 1e-300, 2 ** 53 + 2];
    await t.models.Series.create({ runId: fx.runs[1].id, observable: "e", chunkIndex: 0, startRow: 0, values });
    const back = await t.models.Series.findOne({ where: { runId: fx.runs[1].id, observable: "e", chunkIndex: 0 } });
    expect(back!.values).toEqual(values);
    expect(await refusal(t.models.Series.create({ runId: fx.runs[1].id, observable: "e", chunkIndex: 1, startRow: 4, values: [] }))).toMatchObject({ constraint: "series_values_check" });
  });

  const est = (over: Record<string, unknown> = {}) => ({
    scope: "run" as const, runId: fx.runs[2].id, pointId: fx.points[1].id, ensembleId: fx.ensemble.id, observable: "absM",
    mean: 0.91, error: 0.002, tauInt: 3.1, tauIntError: 0.3, n: 9000, method: "gamma", analysisVersion: "1.0.0", ...over,
  });

  it("refuses an estimate whose scope and runId disagree, a negative or NaN error", async () => {
    const E = t.models.Estimate;
    expect(await refusal(E.create(est({ runId: null })))).toMatchObject({ constraint: "estimates_scope_run" });
    expect(await refusal(E.create(est({ scope: "point" })))).toMatchObject({ constraint: "estimates_scope_run" });
    expect(await refusal(E.create(est({ error: -0.1 })))).toMatchObject({ constraint: "estimates_error_check" });
    expect(await refusal(E.create(est({ error: Number.NaN })))).toMatchObject({ constraint: "estimates_error_check" });
  });

  it("allows one current estimate per (run, observable) and per (point, observable); older versions may stay", async () => {
    const E = t.models.Estimate;
    const v1 = await E.create(est());
    expect(await refusal(E.create(est({ version: 2 })))).toMatchObject({ code: SQLSTATE.unique, constraint: "estimates_one_current" });
    await v1.update({ isCurrent: false });
    await E.create(est({ version: 2 }));
    await E.create(est({ observable: "e" })); // another observable of the same run is independent
    await E.create(est({ scope: "point", runId: null }));
    expect(await refusal(E.create(est({ scope: "point", runId: null, version: 2 })))).toMatchObject({ constraint: "estimates_one_current" });
    expect(await E.count({ where: { runId: fx.runs[2].id, observable: "absM", isCurrent: true } })).toBe(1);
  });
});

describe("manuscripts and the outbox", () => {
  it("refuses a frozen manuscript without freeze time and author, and a snapshot without its hash", async () => {
    const M = t.models.Manuscript;
    expect(await refusal(M.create({ groupId: group.id, title: "Critical exponents", state: "frozen", createdById: owner.id }))).toMatchObject({ constraint: "manuscripts_frozen" });
    const m = await M.create({ groupId: group.id, title: "Critical exponents", createdById: owner.id });
    expect(await refusal(t.models.Exhibit.create({ manuscriptId: m.id, label: "Fig. 1", kind: "figure", query: {}, snapshot: { rows: [] } })))
      .toMatchObject({ constraint: "exhibits_snapshot_hash" });
    expect(await refusal(t.models.Exhibit.create({ manuscriptId: m.id, label: "Fig. 1", kind: "movie" as never, query: {} }))).toMatchObject({ constraint: "exhibits_kind_check" });
  });

  it("refuses a message without recipients, a second message with the same dedupe key, and 'sent' without sentAt", async () => {
    const O = t.models.OutboxMessage;
    const msg = { to: ["pi@test.example"], subject: "80 %", textBody: "…", kind: "allocation.80" };
    expect(await refusal(O.create({ ...msg, to: [] }))).toMatchObject({ constraint: "outbox_messages_to_check" });
    await O.create({ ...msg, dedupeKey: "allocation:1:80" });
    await O.create({ ...msg }); // no key: no deduplication
    await O.create({ ...msg });
    expect(await refusal(O.create({ ...msg, dedupeKey: "allocation:1:80" }))).toMatchObject({ code: SQLSTATE.unique, constraint: "outbox_messages_dedupe_key" });
    expect(await refusal(O.create({ ...msg, state: "sent" }))).toMatchObject({ constraint: "outbox_messages_sent" });
  });
});
