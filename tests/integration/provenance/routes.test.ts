// Manuscripts, provenance and audit over HTTP against the running test stack: group scope (outsiders get 404),
// roles (a viewer reads a frozen manuscript but may not freeze or unfreeze it), the verification job run by the
// stack's broker, the bundle's hashes, PROV-JSON per run / ensemble / estimate, and the audit log with its filters.
import crypto from "node:crypto";
import { beforeAll, describe, expect, it } from "vitest";
import yauzl from "yauzl";
import { ajv } from "@/lib/validation";
import { provJsonSchema } from "@/lib/provenance/prov-json-schema";
import { base, api } from "@/tests/support/http";
import { makeMatrixPeople, type Person } from "@/tests/integration/auth/people-fixture";
import { db, type Ensemble, type Run } from "@/models";
import { buildHttpEnsemble } from "./http-fixture";

type Fx = Awaited<ReturnType<typeof makeMatrixPeople>>;
let fx: Fx;
let ensemble: Ensemble;
let runs: Run[];
let msId: string;
const as = (role: string, where: "member" | "outsider" = "member"): { token: string } => ({ token: fx.people.find((p: Person) => p.role === role && p.where === where)!.token });
const validateProv = ajv.compile(provJsonSchema);

beforeAll(async () => {
  fx = await makeMatrixPeople();
  const owner = fx.people.find((p) => p.role === "researcher" && p.where === "member")!;
  ({ ensemble, runs } = await buildHttpEnsemble(fx.groupA, owner.id));
}, 120_000);

/** Read every entry of a zip into memory (the bundle is small). */
function unzip(buf: Buffer): Promise<Map<string, Buffer>> {
  return new Promise((resolve, reject) => yauzl.fromBuffer(buf, { lazyEntries: true }, (err, zip) => {
    if (err || !zip) return reject(err);
    const out = new Map<string, Buffer>();
    zip.on("entry", (e: yauzl.Entry) => zip.openReadStream(e, (err2, s) => {
      if (err2 || !s) return reject(err2);
      const parts: Buffer[] = [];
      s.on("data", (c: Buffer) => parts.push(c)).on("end", () => { out.set(e.fileName, Buffer.concat(parts)); zip.readEntry(); });
    }));
    zip.on("end", () => resolve(out)).on("error", reject);
    zip.readEntry();
  }));
}
const total = (r: { json: unknown }) => (r.json as { total: number }).total;
const sha = (b: Buffer) => crypto.createHash("sha256").update(b).digest("hex");

describe("manuscripts over HTTP", () => {
  it("a leading PI creates a manuscript; a viewer and a PI of another group may not", async () => {
    expect((await api("POST", "/api/v1/manuscripts", as("viewer"), { groupId: fx.groupA.id, title: "no" })).status).toBe(403);
    expect((await api("POST", "/api/v1/manuscripts", as("pi", "outsider"), { groupId: fx.groupA.id, title: "no" })).status).toBe(403);
    const bad = await api("POST", "/api/v1/manuscripts", as("pi"), { groupId: fx.groupA.id });
    expect(bad.status).toBe(422);
    const res = await api("POST", "/api/v1/manuscripts", as("pi"), { groupId: fx.groupA.id, title: "Critical behaviour of small lattices", journal: "Phys. Rev. E" });
    expect(res.status).toBe(201);
    msId = res.json!.data.id;
  });

  it("adds two exhibits, one from a saved explorer view, one from a query; others are refused", async () => {
    const view = await api("POST", "/api/v1/views", as("pi"), { name: "absM per T", groupId: fx.groupA.id, query: { ensembleIds: [ensemble.id], observable: "absM", scope: "point" }, plot: { x: "T", groupBy: "ensemble" } });
    expect(view.status, view.text).toBe(201);
    const a = await api("POST", `/api/v1/manuscripts/${msId}/exhibits`, as("pi"), { label: "Fig. 1", caption: "|m| against T", kind: "figure", viewId: view.json!.data.id });
    expect(a.status, a.text).toBe(201);
    expect(a.json!.data.query).toMatchObject({ observable: "absM", x: "T", viewId: view.json!.data.id });
    const b = await api("POST", `/api/v1/manuscripts/${msId}/exhibits`, as("pi"), { label: "Table 1", kind: "table", query: { ensembleIds: [ensemble.id], observable: "e", scope: "run", params: [{ name: "T", min: 2.5 }] } });
    expect(b.status, b.text).toBe(201);
    // a researcher of the group who is no collaborator: 403; a researcher of another group: 404; a viewer: 403 by role
    expect((await api("POST", `/api/v1/manuscripts/${msId}/exhibits`, as("researcher"), { label: "X", kind: "table", query: {} })).status).toBe(403);
    expect((await api("POST", `/api/v1/manuscripts/${msId}/exhibits`, as("researcher", "outsider"), { label: "X", kind: "table", query: {} })).status).toBe(404);
    expect((await api("POST", `/api/v1/manuscripts/${msId}/exhibits`, as("viewer"), { label: "X", kind: "table", query: {} })).status).toBe(403);
    expect((await api("POST", `/api/v1/manuscripts/${msId}/exhibits`, as("pi"), { label: "Fig. 1", kind: "figure", query: {} })).status).toBe(409);
  });

  it("freeze: the viewer and the researcher are refused, the PI freezes; then exhibits cannot be added", async () => {
    expect((await api("POST", `/api/v1/manuscripts/${msId}/freeze`, as("viewer"))).status).toBe(403);
    expect((await api("POST", `/api/v1/manuscripts/${msId}/freeze`, as("researcher"))).status).toBe(403);
    expect((await api("POST", `/api/v1/manuscripts/${msId}/freeze`, as("pi", "outsider"))).status).toBe(404);
    const res = await api("POST", `/api/v1/manuscripts/${msId}/freeze`, as("pi"));
    expect(res.status, res.text).toBe(200);
    expect(res.json!.data.state).toBe("frozen");
    expect((await api("POST", `/api/v1/manuscripts/${msId}/exhibits`, as("pi"), { label: "Fig. 2", kind: "figure", query: {} })).status).toBe(409);
  });

  it("a viewer of the group reads the frozen manuscript with its snapshots; an outsider sees nothing", async () => {
    const res = await api("GET", `/api/v1/manuscripts/${msId}`, as("viewer"));
    expect(res.status).toBe(200);
    const d = res.json!.data;
    expect(d.state).toBe("frozen");
    expect(d.may).toMatchObject({ freeze: false, unfreeze: false, verify: false });
    // Fig. 1: one point estimate per temperature; Table 1: the two run estimates at T = 2.587
    expect(d.exhibits.map((x: { snapshot: { estimates: unknown[] } }) => x.snapshot.estimates.length)).toEqual([2, 2]);
    expect(d.exhibits[1].snapshot.runs).toHaveLength(2);
    expect(d.exhibits.every((x: { snapshotHash: string }) => /^[0-9a-f]{64}$/.test(x.snapshotHash))).toBe(true);
    expect((await api("GET", `/api/v1/manuscripts/${msId}`, as("researcher", "outsider"))).status).toBe(404);
    const list = await api("GET", "/api/v1/manuscripts", as("viewer"));
    expect(list.json!.data.map((m: { id: string }) => m.id)).toContain(msId);
    const outside = await api("GET", "/api/v1/manuscripts", as("pi", "outsider"));
    expect(outside.json!.data.map((m: { id: string }) => m.id)).not.toContain(msId);
  });

  it("verify runs on the stack's broker and reports every exhibit verified", async () => {
    expect((await api("POST", `/api/v1/manuscripts/${msId}/verify`, as("viewer"))).status).toBe(403);
    const res = await api("POST", `/api/v1/manuscripts/${msId}/verify`, as("pi"));
    expect(res.status, res.text).toBe(202);
    const vid = res.json!.data.verificationId;
    let v: { state: string; itemsDone: number; itemsTotal: number; report: { exhibits: { label: string; status: string }[]; filesChecked: number } | null } | null = null;
    for (let i = 0; i < 120; i++) { // the broker takes the job off the queue; wait for it to finish (not a timing assertion)
      v = (await api("GET", `/api/v1/manuscripts/${msId}/verifications/${vid}`, as("viewer"))).json!.data;
      if (v && !["queued", "running"].includes(v.state)) break;
      await new Promise((r) => setTimeout(r, 500));
    }
    expect(v!.state).toBe("verified");
    expect(v!.itemsDone).toBe(v!.itemsTotal);
    expect(v!.report!.exhibits.map((x) => [x.label, x.status])).toEqual([["Fig. 1", "verified"], ["Table 1", "verified"]]);
    expect(v!.report!.filesChecked).toBeGreaterThanOrEqual(4 * 2); // each run archives at least its manifest and its series
    expect((await api("GET", `/api/v1/manuscripts/${msId}/verifications/${vid}`, as("researcher", "outsider"))).status).toBe(404);
    expect((await api("GET", `/api/v1/manuscripts/${msId}/verifications/${crypto.randomUUID()}`, as("pi"))).status).toBe(404);
  }, 90_000);

  it("the bundle's manifest and SHA256SUMS match every file in the zip, and the archived files match their recorded hashes", async () => {
    const res = await fetch(`${base}/api/v1/manuscripts/${msId}/bundle`, { headers: { authorization: `Bearer ${as("viewer").token}` } });
    expect(res.status).toBe(200);
    expect(res.headers.get("content-type")).toBe("application/zip");
    const files = await unzip(Buffer.from(await res.arrayBuffer()));
    const manifest = JSON.parse(files.get("manifest.json")!.toString()) as { files: { path: string; sha256: string; bytes: number; included: boolean }[]; exhibits: { label: string; file: string; estimates: number }[] };
    expect([...files.keys()].filter((f) => f !== "manifest.json").sort()).toEqual(manifest.files.filter((f) => f.included).map((f) => f.path).sort());
    for (const f of manifest.files) {
      expect(sha(files.get(f.path)!), f.path).toBe(f.sha256);
      expect(files.get(f.path)!.length, f.path).toBe(f.bytes);
    }
    const sums = files.get("SHA256SUMS")!.toString().trim().split("\n").map((l) => l.split("  "));
    expect(sums.length).toBe(manifest.files.length - 1); // every file but SHA256SUMS itself
    for (const [hash, p] of sums) expect(sha(files.get(p)!), p).toBe(hash);
    // the archived files' hashes are those the database recorded at import
    const recorded = (await db().sequelize.query(`SELECT a.sha256 FROM run_artifacts ra JOIN artifacts a ON a.sha256 = ra.artifact_sha256 WHERE ra.run_id = ANY($1)`,
      { bind: [runs.map((r) => r.id)], type: "SELECT" })) as { sha256: string }[];
    const archived = manifest.files.filter((f) => f.path.startsWith("archive/"));
    expect(new Set(archived.map((f) => f.sha256))).toEqual(new Set(recorded.map((r) => r.sha256)));
    const csv = files.get(manifest.exhibits[0].file)!.toString().trim().split("\n");
    expect(csv[1].split(",")).toEqual(expect.arrayContaining(["param_T", "mean", "error", "tau_int", "analysis_version"]));
    expect(csv.length - 2).toBe(2); // comment line, header, one row per point estimate
    expect(files.get("README.md")!.toString()).toContain("sha256sum -c SHA256SUMS");
    expect(JSON.parse(files.get("provenance.prov.json")!.toString())).toSatisfy((d: unknown) => validateProv(d) as boolean);
  });

  it("unfreeze needs a PI of the group and a reason; an admin is refused; the audit log keeps the reason", async () => {
    expect((await api("POST", `/api/v1/manuscripts/${msId}/unfreeze`, as("viewer"), { reason: "x" })).status).toBe(403);
    expect((await api("POST", `/api/v1/manuscripts/${msId}/unfreeze`, as("admin"), { reason: "x" })).status).toBe(403);
    expect((await api("POST", `/api/v1/manuscripts/${msId}/unfreeze`, as("pi"), {})).status).toBe(422);
    const res = await api("POST", `/api/v1/manuscripts/${msId}/unfreeze`, as("pi"), { reason: "referee asked for a larger lattice" });
    expect(res.status, res.text).toBe(200);
    const audit = await api("GET", `/api/v1/audit?action=manuscript.unfreeze&target=${msId}`, as("pi"));
    expect(audit.status).toBe(200);
    expect(total(audit)).toBe(1);
    expect(audit.json!.data[0].detail.reason).toBe("referee asked for a larger lattice");
  });
});

describe("audit over HTTP", () => {
  it("PIs see their groups' entries, admins all, others are refused; filters and CSV work", async () => {
    expect((await api("GET", "/api/v1/audit", as("researcher"))).status).toBe(403);
    expect((await api("GET", "/api/v1/audit", as("viewer"))).status).toBe(403);
    const mine = await api("GET", `/api/v1/audit?target=${msId}&pageSize=100`, as("pi"));
    expect(mine.status, mine.text).toBe(200);
    const actions = (mine.json!.data as { action: string }[]).map((r) => r.action);
    expect(actions).toEqual(expect.arrayContaining(["manuscript.create", "manuscript.exhibit.add", "manuscript.freeze", "manuscript.verify", "manuscript.unfreeze"]));
    expect(total(await api("GET", `/api/v1/audit?target=${msId}`, as("pi", "outsider")))).toBe(0);
    expect(total(await api("GET", `/api/v1/audit?target=${msId}`, as("admin", "outsider")))).toBe(total(mine));
    expect(total(await api("GET", `/api/v1/audit?target=${msId}&from=2999-01-01`, as("pi")))).toBe(0);
    expect((await api("GET", `/api/v1/audit?from=yesterday`, as("pi"))).status).toBe(422);
    const pi = fx.people.find((p) => p.role === "pi" && p.where === "member")!;
    expect(total(await api("GET", `/api/v1/audit?target=${msId}&actor=${pi.id}`, as("pi")))).toBe(total(mine));
    const csv = await api("GET", `/api/v1/audit?target=${msId}&format=csv`, as("pi"));
    expect(csv.text.split("\n")[0]).toBe("time_utc,actor_id,actor,action,target_type,target_id,group_id,ip,request_id,detail");
    expect(csv.text.trim().split("\n").length - 1).toBe(total(mine));
  });
});

describe("provenance over HTTP", () => {
  it("a run's PROV-JSON validates and names its sampler, seed file and archived files; outsiders get 404", async () => {
    const res = await api("GET", `/api/v1/provenance/runs/${runs[0].id}`, as("viewer"));
    expect(res.status).toBe(200);
    const doc = res.json as unknown as { entity: Record<string, unknown>; activity: Record<string, unknown>; agent: Record<string, unknown>; used: Record<string, unknown> };
    expect(validateProv(doc)).toBe(true);
    expect(Object.keys(doc.activity)).toContain(`run:${runs[0].id}`);
    expect(Object.keys(doc.entity).some((k) => k.includes(`${runs[0].id}/run.json`))).toBe(true);
    expect(Object.keys(doc.agent).some((k) => k.includes("ising2d"))).toBe(true);
    expect((await api("GET", `/api/v1/provenance/runs/${runs[0].id}`, as("researcher", "outsider"))).status).toBe(404);
    const listing = await api("GET", `/api/v1/provenance/runs/${runs[0].id}?format=listing-csv`, as("viewer"));
    expect(listing.text.split("\n")[0]).toBe("kind,id,type,label,from,to,details");
    expect((await api("GET", `/api/v1/provenance/runs/${runs[0].id}?format=pdf`, as("viewer"))).status).toBe(422);
  });

  it("an ensemble's and a point estimate's PROV-JSON contain every run beneath them", async () => {
    const ens = await api("GET", `/api/v1/provenance/ensembles/${ensemble.id}`, as("viewer"));
    expect(validateProv(ens.json)).toBe(true);
    const runActivities = (d: unknown) => Object.keys((d as { activity: object }).activity).filter((k) => /run:[0-9a-f-]{36}$/.test(k));
    expect(runActivities(ens.json)).toHaveLength(4);
    const [point] = (await db().sequelize.query(`SELECT id FROM estimates WHERE ensemble_id = $1 AND scope = 'point' AND observable = 'e' AND is_current LIMIT 1`, { bind: [ensemble.id], type: "SELECT" })) as { id: string }[];
    const est = await api("GET", `/api/v1/provenance/estimates/${point.id}?format=listing-json`, as("pi"));
    expect(est.status).toBe(200);
    const rows = est.json!.data as { kind: string; from: string; to: string }[];
    // the point estimate derives from exactly its two replicas' run estimates
    expect(rows.filter((r) => r.kind === "wasDerivedFrom" && r.from.endsWith(point.id))).toHaveLength(2);
    expect((await api("GET", `/api/v1/provenance/estimates/${point.id}`, as("pi", "outsider"))).status).toBe(404);
    expect((await api("GET", `/api/v1/provenance/ensembles/${ensemble.id}`, as("coordinator", "outsider"))).status).toBe(200);
  });
});
