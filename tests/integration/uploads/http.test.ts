// Uploads over HTTP against the running test stack (npm test) and the `ergodex deposit` CLI.
import { execFile } from "node:child_process";
import fs from "node:fs";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { env } from "@/lib/env";
import { DEMO_PEOPLE } from "@/lib/seed/demo-scenario";
import { db } from "@/models";
import { api, base } from "../../support/http";
import { cleanupTemp, copyBundle, editCsv, tempDir } from "../importer/bundles";
import { demoToken, filesOf, goodBundle, randomSeed, leftovers, tarOf, uploadCounts, zipOf } from "./support";

let token: string;
const seed = randomSeed;
afterAll(cleanupTemp);

beforeAll(async () => {
  token = await demoToken("researcher", "upload test");
});

const post = async (body: BodyInit, type?: string, name?: string) => {
  const headers: Record<string, string> = { authorization: `Bearer ${token}` };
  if (type) headers["content-type"] = type;
  if (name) headers["x-file-name"] = name;
  const res = await fetch(`${base}/api/v1/imports`, { method: "POST", headers, body });
  return { status: res.status, json: (await res.json()) as { data?: any; error?: { code: string; message: string } } }; // eslint-disable-line @typescript-eslint/no-explicit-any
};

function cli(args: string[]): Promise<{ code: number; stdout: string; stderr: string }> {
  return new Promise((resolve) => {
    execFile(process.execPath, ["scripts/ergodex-cli.mjs", ...args], { env: { PATH: process.env.PATH ?? "", ERGODEX_URL: base, ERGODEX_TOKEN: token } as unknown as NodeJS.ProcessEnv, timeout: 60_000, encoding: "utf8" },
      (err, stdout, stderr) => resolve({ code: err ? Number((err as { code?: number }).code ?? 1) : 0, stdout, stderr }));
  });
}

describe("POST /api/v1/imports over HTTP", () => {
  it("a zip is accepted once (201), then reported already imported (200); the list shows who, the original names and the run", async () => {
    const zip = new Uint8Array(await zipOf(filesOf(goodBundle(seed()), "outside-run/")));
    const first = await post(zip, "application/zip", "outside.zip");
    expect(first.status, JSON.stringify(first.json)).toBe(201);
    expect(first.json.data.bundles).toMatchObject([{ status: "accepted", bundle: "outside.zip:outside-run" }]);
    const before = await uploadCounts();
    const again = await post(zip, "application/zip", "outside.zip");
    expect(again.status).toBe(200);
    expect(again.json.data.bundles).toMatchObject([{ status: "already-imported", importId: first.json.data.bundles[0].importId }]);
    expect(await uploadCounts()).toEqual(before);
    const list = await api("GET", "/api/v1/imports?source=upload&pageSize=200", { token });
    const row = (list.json as unknown as { data: any[] }).data.find((r) => r.id === first.json.data.bundles[0].importId); // eslint-disable-line @typescript-eslint/no-explicit-any
    expect(row).toMatchObject({ state: "accepted", source: "upload", run: { id: first.json.data.bundles[0].runId } });
    expect(row.originalNames).toContain("outside.zip:outside-run/series.csv");
    expect(row.uploadedBy.name).toBe(DEMO_PEOPLE.find((p) => p.role === "researcher")!.name);
  });

  it("a multipart bundle with a NaN is refused naming file, line and column; nothing stays but the rejected Import", async () => {
    const dir = copyBundle(goodBundle(seed()));
    editCsv(dir, (l) => { const c = l[4].split(","); c[2] = "NaN"; l[4] = c.join(","); });
    const form = new FormData();
    for (const [name, data] of filesOf(dir, "bad/")) form.append("file", new Blob([new Uint8Array(data)]), name);
    const before = await uploadCounts();
    const res = await post(form);
    expect(res.status).toBe(200);
    expect(res.json.data.bundles).toMatchObject([{ status: "refused", file: "series.csv", line: 5 }]);
    expect(res.json.data.bundles[0].reason).toMatch(/series\.csv line 5 column "absM": "NaN" is not finite/);
    expect(await uploadCounts()).toEqual(before);
    expect((await db().Import.findByPk(res.json.data.bundles[0].importId))).toMatchObject({ state: "rejected", runId: null });
  });

  it("upload-level refusals: a JSON body is 400, an empty upload 422, a viewer 403", async () => {
    expect((await post(JSON.stringify({}), "application/json")).status).toBe(400);
    const empty = await post(new Uint8Array(0), "application/zip");
    expect(empty.status).toBe(422);
    expect(empty.json.error!.message).toMatch(/the upload is empty/);
    const vt = await demoToken("viewer", "viewer upload");
    const res = await fetch(`${base}/api/v1/imports`, { method: "POST", headers: { authorization: `Bearer ${vt}`, "content-type": "application/zip" }, body: new Uint8Array(await zipOf(filesOf(goodBundle(seed())))) });
    expect(res.status).toBe(403);
    expect(leftovers(env.uploads.dir)).toEqual([]);
  });
});

describe("ergodex deposit", () => {
  it("deposits a folder (exit 0), reports it already imported the second time, and refuses a .tar.gz with a link (exit 1)", async () => {
    const dir = goodBundle(seed());
    const first = await cli(["deposit", dir]);
    expect(first.code, first.stderr).toBe(0);
    expect(first.stdout).toMatch(/^accepted\s+out\s+run [0-9a-f-]{36} \(200 rows: e, absM, m2, m4\)$/m);
    const second = await cli(["deposit", dir]);
    expect(second.code).toBe(0);
    expect(second.stdout).toMatch(/already imported .*\n0 accepted, 1 already imported, 0 refused/);
    const tgz = path.join(tempDir(), "linked.tar.gz");
    fs.writeFileSync(tgz, await tarOf([{ name: "b/manifest.json", data: fs.readFileSync(path.join(dir, "manifest.json")) }, { name: "b/series.csv", type: "symlink", linkname: "/etc/passwd" }]));
    const bad = await cli(["deposit", tgz]);
    expect(bad.code).toBe(1);
    expect(bad.stdout).toMatch(/refused\s+linked\.tar\.gz\n\s+linked\.tar\.gz: b\/series\.csv: is a symbolic link/);
    expect(leftovers(env.uploads.dir)).toEqual([]);
  });
});
