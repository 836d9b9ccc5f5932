// The ensemble API and the ergodex CLI over HTTP, against the running test stack (npm test) and its demo database.
// What is submitted here really runs on the loopback cluster, so it is kept tiny (ising2d L=8, 300 sweeps).
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import crypto from "node:crypto";
import { execFile } from "node:child_process";
import { beforeAll, describe, expect, it } from "vitest";
import { db } from "@/models";
import { createApiToken } from "@/lib/auth/tokens";
import { ensembleSpecSchema } from "@/lib/spec/schema";
import { DEMO_PEOPLE } from "@/lib/seed/demo-scenario";
import { api, base } from "../../support/http";
import { makeEnsemble } from "../../support/db";

const researcherEmail = DEMO_PEOPLE.find((p) => p.role === "researcher")!.email;
let token: string;
let tmp: string;
let submittedId: string; // the tiny ensemble submitted over HTTP, which the stack's broker runs
const tag = `api-${crypto.randomBytes(4).toString("hex")}`;

const tinySpec = (over: Record<string, unknown> = {}) => ({
  format: "ergodex.ensemble/1", name: `tiny ${tag}`, sampler: { name: "ising2d", version: "1.0.0" },
  fixed: { L: 8, algorithm: "metropolis" }, scan: [{ param: "T", values: [2.2, 2.4] }], replicas: 1,
  thermalization: 100, measurements: 200, seed: "424242", resources: { cores: 1, wallMinutes: 5 }, tags: [tag], cluster: "tarn-loopback", ...over,
});

/** Run the CLI; resolves with its exit code and output (never rejects on a non-zero exit). */
function cli(args: string[], env: Record<string, string | undefined> = {}): Promise<{ code: number; stdout: string; stderr: string }> {
  const vars: Record<string, string> = { PATH: process.env.PATH ?? "", ERGODEX_URL: base, ERGODEX_TOKEN: token };
  for (const [k, v] of Object.entries(env)) if (v === undefined) delete vars[k]; else vars[k] = v;
  return new Promise((resolve) => {
    execFile(process.execPath, ["scripts/ergodex-cli.mjs", ...args], { env: vars as NodeJS.ProcessEnv, timeout: 30_000, encoding: "utf8" }, (err, stdout, stderr) => {
      const code = err ? (typeof (err as { code?: unknown }).code === "number" ? (err as { code: number }).code : 1) : 0;
      resolve({ code, stdout, stderr });
    });
  });
}

/** A demo-group ensemble with queued runs and no cluster and no dispatch job: nothing the broker will start. */
async function parkedEnsemble() {
  const m = db();
  const owner = (await m.User.findOne({ where: { email: researcherEmail } }))!;
  const group = (await m.Group.findByPk((await m.Membership.findOne({ where: { userId: owner.id } }))!.groupId))!;
  const sampler = (await m.Sampler.findOne({ where: { name: "ising2d", version: "1.0.0" } }))!;
  return makeEnsemble({ owner, group, sampler, cluster: null, allocation: null, points: [{ L: 8, T: 2.2, algorithm: "metropolis" }, { L: 8, T: 2.4, algorithm: "metropolis" }], replicas: 1 });
}

beforeAll(async () => {
  const user = (await db().User.findOne({ where: { email: researcherEmail } }))!;
  token = (await createApiToken({ actorId: user.id, ip: null, requestId: null }, user.id, `ensemble api test ${tag}`, 1)).token;
  tmp = fs.mkdtempSync(path.join(os.tmpdir(), "ergodex-cli-"));
});

describe("HTTP API", () => {
  it("serves the spec's JSON Schema to anyone, as it is in lib/spec", async () => {
    const res = await api("GET", "/api/v1/schemas/ensemble-spec");
    expect(res.status).toBe(200);
    expect(res.json).toEqual(JSON.parse(JSON.stringify(ensembleSpecSchema)));
  });

  it("refuses a bad spec with 422 and the path of every offending field", async () => {
    const res = await api("POST", "/api/v1/ensembles", { token }, tinySpec({ replicas: 0, scan: [{ param: "T", values: [2.2, -3] }] }));
    expect(res.status).toBe(422);
    expect(res.json!.error!.code).toBe("invalid");
    expect(res.json!.error!.issues!.map((i) => i.path)).toEqual(["/replicas"]);
    const points = await api("POST", "/api/v1/ensembles", { token }, tinySpec({ scan: [{ param: "T", values: [2.2, -3] }] }));
    expect(points.status).toBe(422);
    expect(points.json!.error!.issues).toEqual([{ path: "/scan/0/values/1", message: "ising2d params.T must be > 0 (got -3)" }]);
    const yaml = await api("POST", "/api/v1/ensembles", { token }, "name: [unclosed\n", { "content-type": "application/yaml" });
    expect(yaml.status).toBe(422);
    expect(yaml.json!.error!.issues![0].message).toMatch(/not valid YAML at line/);
  });

  it("submits (201), then lists, details and exports it; the run page has its creation event", async () => {
    const preview = await api("POST", "/api/v1/ensembles/preview", { token }, tinySpec());
    expect(preview.status).toBe(200);
    expect(preview.json!.data).toMatchObject({ points: 2, runs: 2, ok: true, coreHoursNeeded: 0.1668 }); // 1 core × 5 min = 0.08333… → 0.0834 per run (rounded up)
    const res = await api("POST", "/api/v1/ensembles", { token }, tinySpec());
    expect(res.status).toBe(201);
    const { ensembleId, runIds } = res.json!.data;
    submittedId = ensembleId;
    expect(runIds).toHaveLength(2);
    expect(preview.json!.data.seeds.map((s: { seed: string }) => s.seed).sort())
      .toEqual((await db().Run.findAll({ where: { id: runIds } })).map((r) => r.seed).sort());

    const list = await api("GET", `/api/v1/ensembles?tag=${tag}&sort=createdAt&order=desc&pageSize=10`, { token });
    expect(list.status).toBe(200);
    expect(list.json).toMatchObject({ total: 1, page: 1, pageSize: 10 });
    expect((list.json as unknown as { data: { id: string }[] }).data.map((r) => r.id)).toEqual([ensembleId]);
    const bad = await api("GET", "/api/v1/ensembles?sort=password", { token });
    expect(bad.status).toBe(422);
    expect(bad.json!.error!.issues![0].path).toBe("?sort");

    const detail = await api("GET", `/api/v1/ensembles/${ensembleId}`, { token });
    expect(detail.status).toBe(200);
    expect(detail.json!.data.counts.total).toBe(2);
    expect(detail.json!.data.coreHours.reserved).toBe(0.1668);
    expect(detail.json!.data.points.map((p: { params: { T: number }; runs: unknown[] }) => [p.params.T, p.runs.length])).toEqual([[2.2, 1], [2.4, 1]]);

    const csv = await fetch(`${base}/api/v1/ensembles/${ensembleId}/estimates?format=csv`, { headers: { authorization: `Bearer ${token}` } });
    expect(csv.status).toBe(200);
    expect(csv.headers.get("content-type")).toMatch(/text\/csv/);
    expect((await csv.text()).split("\r\n")[0]).toMatch(/^point,L,T,algorithm,run_id|^point,run_id/);

    const run = await api("GET", `/api/v1/runs/${runIds[0]}`, { token });
    expect(run.status).toBe(200);
    expect(run.json!.data.events[0]).toMatchObject({ from: null, to: "queued", cause: "user.submit" });
    expect(run.json!.data.ensemble.id).toBe(ensembleId);
    expect((await api("GET", `/api/v1/runs/${crypto.randomUUID()}`, { token })).status).toBe(404);
  });
});

/** Poll the detail endpoint until every run has ended (the broker and the loopback cluster run it), or give up. */
async function untilEnded(id: string, deadlineMs = 240_000) {
  const t0 = Date.now();
  for (;;) {
    const d = (await api("GET", `/api/v1/ensembles/${id}`, { token })).json!.data;
    const open = d.counts.total - d.counts.done - d.counts.failed - d.counts.cancelled;
    if (open === 0 || Date.now() - t0 > deadlineMs) return d;
    await new Promise((r) => setTimeout(r, 1000));
  }
}

describe("a submitted ensemble, once run by the stack", () => {
  it("ends done, charged, and its point estimates come back through the CLI as CSV", async () => {
    const d = await untilEnded(submittedId);
    expect(d.counts).toMatchObject({ total: 2, done: 2 });
    expect(d.coreHours.held).toBe(0); // settled: every run charged what it used and released the rest
    expect(d.coreHours.charged + d.coreHours.released).toBeCloseTo(d.coreHours.reserved, 4);
    const out = path.join(tmp, "done.csv");
    const fetched = await cli(["fetch-estimates", submittedId, "-o", out]);
    expect(fetched.code).toBe(0);
    const [head, ...rows] = fs.readFileSync(out, "utf8").trimEnd().split("\r\n").map((l) => l.split(","));
    const col = (name: string) => head.indexOf(name);
    // at both points the 4 ising2d series observables (DESIGN.md), plus whatever the analysis derives from them
    const at = (T: string) => rows.filter((r) => r[col("T")] === T).map((r) => r[col("observable")]).sort();
    expect(at("2.2")).toEqual(expect.arrayContaining(["absM", "e", "m2", "m4"]));
    expect(at("2.4")).toEqual(at("2.2"));
    expect(rows).toHaveLength(2 * at("2.2").length);
    for (const r of rows.filter((r) => ["absM", "e", "m2", "m4"].includes(r[col("observable")]))) {
      expect(Number.isFinite(Number(r[col("mean")]))).toBe(true);
      expect(Number(r[col("error")])).toBeGreaterThan(0);
    }
  }, 300_000);
});

describe("the ergodex CLI", () => {
  it("prints help and exits 0; an unknown command or a missing token exit 2 with a reason", async () => {
    const help = await cli(["--help"]);
    expect(help.code).toBe(0);
    expect(help.stdout).toMatch(/ergodex send <spec\.json\|spec\.yaml>/);
    const unknown = await cli(["launch"]);
    expect(unknown).toMatchObject({ code: 2 });
    expect(unknown.stderr).toMatch(/unknown command "launch"/);
    const noToken = await cli(["look", crypto.randomUUID()], { ERGODEX_TOKEN: "" });
    expect(noToken.code).toBe(2);
    expect(noToken.stderr).toMatch(/ERGODEX_TOKEN is not set/);
    const away = await cli(["look", crypto.randomUUID()], { ERGODEX_URL: "http://127.0.0.1:9" });
    expect(away.code).toBe(3);
    expect(away.stderr).toMatch(/cannot reach http:\/\/127\.0\.0\.1:9/);
  });

  it("send: a YAML spec file is submitted; a bad one is refused with the field paths and exit 1", async () => {
    const file = path.join(tmp, "tiny.yaml");
    fs.writeFileSync(file, [
      "format: ergodex.ensemble/1", `name: tiny yaml ${tag}`, "sampler: { name: ising2d, version: '1.0.0' }",
      "fixed: { L: 8, T: 2.3, algorithm: metropolis }", "replicas: 1", "thermalization: 100", "measurements: 200",
      "seed: '77'", "resources: { cores: 1, wallMinutes: 5 }", "cluster: tarn-loopback", `tags: [${tag}-cli]`, ""].join("\n"));
    const sent = await cli(["send", file]);
    expect(sent.stderr).toBe("");
    expect(sent.code).toBe(0);
    const id = /submitted ensemble ([0-9a-f-]{36}): 1 runs at 1 points/.exec(sent.stdout)?.[1];
    expect(id).toBeDefined();
    expect(await db().Ensemble.count({ where: { id, name: `tiny yaml ${tag}` } })).toBe(1);

    fs.writeFileSync(path.join(tmp, "bad.json"), JSON.stringify(tinySpec({ resources: { cores: 1, wallMinutes: 99999 }, sampler: { name: "potts", version: "1" } })));
    const bad = await cli(["send", path.join(tmp, "bad.json")]);
    expect(bad.code).toBe(1);
    expect(bad.stderr).toMatch(/\(invalid, HTTP 422\)/);
    expect(bad.stderr).toMatch(/ {2}\/resources\/wallMinutes: must be <= 10080/);
    const missing = await cli(["send", path.join(tmp, "nope.yaml")]);
    expect(missing.code).toBe(2);
    expect(missing.stderr).toMatch(/cannot read .*nope\.yaml: ENOENT/);
  });

  it("look, fetch-estimates and halt on an ensemble the broker will not start", async () => {
    const { ensemble, points } = await parkedEnsemble();
    await db().Estimate.create({ scope: "point", runId: null, pointId: points[1].id, ensembleId: ensemble.id, observable: "absM", mean: 0.8123, error: 0.0021,
      tauInt: 4.2, tauIntError: 0.3, n: 190, method: "gamma", analysisVersion: "test", params: points[1].params });
    const look = await cli(["look", ensemble.id]);
    expect(look.code).toBe(0);
    expect(look.stdout).toMatch(/runs: 2 queued/);
    expect(look.stdout).toMatch(/ {3}1 {2}q {2}\{"L":8,"T":2\.4,"algorithm":"metropolis"\}/);

    const out = path.join(tmp, "est", "estimates.csv");
    const fetched = await cli(["fetch-estimates", ensemble.id, "-o", out]);
    expect(fetched.code).toBe(0);
    expect(fetched.stderr).toMatch(/wrote 1 estimates/);
    const lines = fs.readFileSync(out, "utf8").trimEnd().split("\r\n");
    expect(lines[1]).toMatch(/^1,8,2\.4,metropolis,,,,absM,0\.8123,0\.0021,4\.2,0\.3,190,/);

    const halted = await cli(["halt", ensemble.id]);
    expect(halted.code).toBe(0);
    expect(halted.stdout).toMatch(/cancelled 2 queued runs/);
    const again = await cli(["halt", ensemble.id]);
    expect(again.code).toBe(1);
    expect(again.stderr).toMatch(/has no queued, dispatched or running runs to cancel \(conflict, HTTP 409\)/);
    const nobody = await cli(["look", crypto.randomUUID()]);
    expect(nobody.code).toBe(1);
    expect(nobody.stderr).toMatch(/not found/);
  });
});
