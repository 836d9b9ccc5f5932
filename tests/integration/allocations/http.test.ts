// The allocation routes over HTTP against the running stack: who sees which rows (a researcher only
// their own person row and ensembles, a PI of the group all of them), the monthly CSV, and an
// over-cap submission refused with its explanation by the API (409 body) and by the CLI.
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import crypto from "node:crypto";
import { execFile } from "node:child_process";
import { beforeAll, describe, expect, it } from "vitest";
import { QueryTypes } from "sequelize";
import { db } from "@/models";
import { createApiToken } from "@/lib/auth/tokens";
import { api, base } from "../../support/http";

const tag = crypto.randomBytes(4).toString("hex");
const tokens: Record<string, string> = {};
const ids: Record<string, string> = {};
let allocationId = "";

async function personWithToken(key: string, role: "researcher" | "pi" | "coordinator", groupId: string | null, name: string) {
  const m = db();
  const u = await m.User.create({ email: `${key}.${tag}@alloc-http.example`, name, role, passwordHash: null });
  if (groupId) await m.Membership.create({ userId: u.id, groupId, isLead: role === "pi" });
  tokens[key] = (await createApiToken({ actorId: u.id, ip: null, requestId: null }, u.id, "alloc http", 1)).token;
  ids[key] = u.id;
}

const entry = (kind: string, coreHours: number, userId: string, at: string) => db().sequelize.query(
  "INSERT INTO ledger_entries (allocation_id, kind, core_hours, user_id, created_at) VALUES ($1, $2, $3, $4, $5)",
  { type: QueryTypes.INSERT, bind: [allocationId, kind, coreHours, userId, new Date(at)] });

beforeAll(async () => {
  const group = await db().Group.create({ slug: `alloc-http-${tag}`, name: `Alloc HTTP ${tag}`, institute: "test" });
  await personWithToken("coord", "coordinator", null, `Coordinator ${tag}`);
  await personWithToken("pi", "pi", group.id, `Pia Lead ${tag}`);
  await personWithToken("ada", "researcher", group.id, `Ada ${tag}`);
  await personWithToken("bo", "researcher", group.id, `Bo ${tag}`);
  const granted = await api("POST", "/api/v1/allocations", { token: tokens.coord }, { groupId: group.id, name: `http ${tag}`, periodStart: "2026-10-01", periodEnd: "2027-10-01", coreHours: 1000 });
  expect(granted.status).toBe(201);
  allocationId = granted.json!.data.id;
  await entry("reserve", 30, ids.ada, "2026-10-05T10:00:00Z");
  await entry("charge", 24, ids.ada, "2026-10-06T10:00:00Z");
  await entry("release", 6, ids.ada, "2026-10-06T10:00:00Z");
  await entry("reserve", 50, ids.bo, "2026-11-03T10:00:00Z");
  await entry("charge", 40, ids.bo, "2026-11-04T10:00:00Z");
  await entry("release", 10, ids.bo, "2026-11-04T10:00:00Z");
  expect((await api("POST", `/api/v1/allocations/${allocationId}/caps`, { token: tokens.coord }, { subject: "everyone", coreHours: 25 })).status).toBe(201);
}, 30_000);

describe("allocation usage over HTTP", () => {
  it("a researcher sees the group's balance and only their own row; the group's PI sees everyone", async () => {
    const ada = await api("GET", `/api/v1/allocations/${allocationId}`, { token: tokens.ada });
    expect(ada.status).toBe(200);
    const a = ada.json!.data;
    expect(a.balance).toMatchObject({ given: 1000, charged: 64, held: 0, free: 936 });
    expect(a.full).toBe(false);
    expect(a.byPerson.map((p: { name: string }) => p.name)).toEqual([`Ada ${tag}`]);
    expect(a.byPerson[0]).toMatchObject({ charged: 24, used: 24, cap: 25 });
    expect(a.ledger).toEqual([]);
    const pi = (await api("GET", `/api/v1/allocations/${allocationId}`, { token: tokens.pi })).json!.data;
    expect(pi.full).toBe(true);
    expect(pi.byPerson.map((p: { name: string; used: number }) => [p.name, p.used])).toEqual([[`Ada ${tag}`, 24], [`Bo ${tag}`, 40], [`Pia Lead ${tag}`, 0]]);
    expect(pi.ledger.map((l: { kind: string; coreHours: number }) => [l.kind, l.coreHours])).toEqual([["grant", 1000]]);
    expect(pi.chart.length).toBeGreaterThan(300); // a year of daily points
  });

  it("the monthly CSV has one total row per month and person rows as the caller may see them", async () => {
    const full = await api("GET", `/api/v1/allocations/${allocationId}/report`, { token: tokens.pi });
    expect(full.status).toBe(200);
    const lines = full.text.trim().split("\n");
    const month = new Date().toISOString().slice(0, 7); // the grant was written today
    expect(lines[0]).toBe("month,who,email,granted,adjusted,reserved,charged,released");
    expect(lines).toContain("2026-10,all,,0,0,30,24,6");
    expect(lines).toContain(`2026-10,Ada ${tag},ada.${tag}@alloc-http.example,0,0,30,24,6`);
    expect(lines).toContain(`2026-11,Bo ${tag},bo.${tag}@alloc-http.example,0,0,50,40,10`);
    expect(lines.some((l) => l.startsWith(`${month},all,,1000,0,`))).toBe(true);
    const own = await api("GET", `/api/v1/allocations/${allocationId}/report`, { token: tokens.ada });
    expect(own.text).toContain(`Ada ${tag}`);
    expect(own.text).not.toContain(`Bo ${tag}`);
    expect(own.text).toContain("2026-11,all,,0,0,50,40,10"); // group totals still there
  });

  it("refuses an over-cap submission with the explanation: API 409 body and the CLI", async () => {
    // Bo has used 40 of a 25 core-hour cap: anything is refused, with his cap as the limit
    const spec = { format: "ergodex.ensemble/1", name: `over cap ${tag}`, sampler: { name: "ising2d", version: "1.0.0" }, fixed: { L: 8, T: 2.3, algorithm: "metropolis" },
      replicas: 1, thermalization: 10, measurements: 10, seed: "5", resources: { cores: 1, wallMinutes: 60 }, allocation: `http ${tag}`, cluster: "tarn-loopback" };
    const res = await api("POST", "/api/v1/ensembles", { token: tokens.bo }, spec);
    expect(res.status).toBe(409);
    expect(res.json!.error).toMatchObject({ code: "insufficient_allocation", limit: "person_cap", needed: 1, free: 0, contacts: [{ name: `Coordinator ${tag}` }] });
    expect(res.json!.error!.message).toContain(`needs 1 core-hours, 0 left of your per-person cap of 25 on "http ${tag}" (40 used or held; the cap for everyone: 25 core-hours). Ask Coordinator ${tag} <coord.${tag}@alloc-http.example>.`);

    const tmp = fs.mkdtempSync(path.join(os.tmpdir(), "alloc-cli-"));
    const file = path.join(tmp, "spec.json");
    fs.writeFileSync(file, JSON.stringify(spec));
    const out = await new Promise<{ code: number; stderr: string }>((resolve) => {
      execFile(process.execPath, ["scripts/ergodex-cli.mjs", "send", file], { env: { PATH: process.env.PATH ?? "", ERGODEX_URL: base, ERGODEX_TOKEN: tokens.bo } as unknown as NodeJS.ProcessEnv, timeout: 30_000, encoding: "utf8" },
        (err, _stdout, stderr) => resolve({ code: err ? Number((err as { code?: number }).code ?? 1) : 0, stderr }));
    });
    expect(out.code).toBe(1);
    expect(out.stderr).toContain("0 left of your per-person cap of 25");
    expect(out.stderr).toContain(`Ask Coordinator ${tag}`);
    expect(out.stderr).toContain("refused by: person cap (needed 1 core-hours, free 0)");
  });

  it("the running broker registered the weekly digest with pg-boss's cron (Mondays 07:00 UTC)", async () => {
    const rows = await db().sequelize.query<{ cron: string; timezone: string }>("SELECT cron, timezone FROM pgboss.schedule WHERE name = 'allocation-digest'", { type: QueryTypes.SELECT });
    expect(rows).toEqual([{ cron: "0 7 * * 1", timezone: "UTC" }]);
  });

  it("a top-up without hours and an adjustment without a reason are 422 with the field", async () => {
    const noHours = await api("POST", `/api/v1/allocations/${allocationId}/ledger`, { token: tokens.coord }, { kind: "top-up" });
    expect(noHours.status).toBe(422);
    expect(noHours.json!.error!.issues).toEqual([{ path: "/coreHours", message: "is required" }]);
    const noReason = await api("POST", `/api/v1/allocations/${allocationId}/ledger`, { token: tokens.coord }, { kind: "adjust", coreHours: -5 });
    expect(noReason.status).toBe(422);
    expect(noReason.json!.error!.issues).toEqual([{ path: "/reason", message: "an adjustment needs a reason" }]);
  });
});
