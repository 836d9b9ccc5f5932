// A coordinator grants an allocation from the Allocations page, sets a cap (a share of the grant),
// and sees the burn-rate chart against the straight line; a researcher of the group whose next
// submission would pass that cap is refused in the submit form and by the API, with the figures,
// the limit that bit and the coordinator to ask; the researcher's own view shows only their row.
import crypto from "node:crypto";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { QueryTypes } from "sequelize";
import type { Browser, Page } from "playwright-core";
import { launch, newPage, signInToOverview, shot } from "./support/browser";
import { DEMO_PEOPLE } from "@/lib/seed/demo-scenario";
import { hashPassword } from "@/lib/auth/passwords";
import { setCap } from "@/lib/allocations/manage-allocations";
import { transitionRun } from "@/lib/runs/transition-run";
import { makeEnsemble } from "@/tests/support/db";
import { db } from "@/models";

const coordinator = DEMO_PEOPLE.find((p) => p.role === "coordinator")!;
const tag = crypto.randomBytes(3).toString("hex");
const groupName = `E2E Allocation Group ${tag}`;
const allocName = `e2e alloc ${tag}`;
const password = `e2e-alloc-pass-${tag}`;
const DAY = 86_400_000;
const isoDay = (t: number) => new Date(t).toISOString().slice(0, 10);
const ALLOC_URL = /\/allocations\/([0-9a-f-]{36})$/;

let browser: Browser;
let close: () => Promise<void>;
let page: Page;
let researcher: { id: string; email: string };
let dana: { id: string };
let allocationId = "";

beforeAll(async () => {
  // A group of its own: a second current allocation in the demo group would make other e2e submissions ambiguous.
  const m = db();
  const group = await m.Group.create({ slug: `e2e-alloc-${tag}`, name: groupName, institute: "e2e" });
  const hash = await hashPassword(password);
  const r = await m.User.create({ email: `alloc.researcher.${tag}@e2e.example`, name: `Rhea Capped ${tag}`, role: "researcher", passwordHash: hash });
  const d = await m.User.create({ email: `alloc.dana.${tag}@e2e.example`, name: `Dana Heavy ${tag}`, role: "researcher", passwordHash: hash });
  for (const u of [r, d]) await m.Membership.create({ userId: u.id, groupId: group.id, isLead: false });
  researcher = { id: r.id, email: r.email };
  dana = { id: d.id };
  ({ browser, close } = await launch());
  ({ page } = await newPage(browser));
  await signInToOverview(page, coordinator.email, coordinator.password);
}, 30_000);
afterAll(async () => close?.());

/** Two parked ensembles of Dana's on the allocation (no cluster, runs cancelled: nothing for the broker to start). */
async function danasEnsembles(id: string): Promise<string[]> {
  const m = db();
  const owner = (await m.User.findByPk(dana.id))!;
  const group = (await m.Group.findOne({ where: { name: groupName } }))!;
  const sampler = (await m.Sampler.findOne({ where: { name: "ising2d", version: "1.0.0" } }))!;
  const out: string[] = [];
  for (const name of ["scan A", "scan B"]) {
    const { ensemble, runs } = await makeEnsemble({ owner, group, sampler, cluster: null, allocation: null, points: [{ L: 8, T: 2.3, algorithm: "metropolis" }], replicas: 1 });
    await ensemble.update({ name: `e2e ${name} ${tag}`, allocationId: id });
    for (const r of runs) await transitionRun(r.id, "cancelled", { cause: "test.park" });
    out.push(ensemble.id);
  }
  return out;
}

/** Thirty days of invented use before today: Dana runs a lot (two ensembles), Rhea 19 core-hours. */
async function backdatedUse(id: string) {
  const ensembles = await danasEnsembles(id);
  const rows: [string, number, number, string | null][] = []; // user, core-hours, days ago, ensemble
  for (let d = 28; d >= 1; d -= 3) rows.push([dana.id, 10 + (d % 7) * 2, d, ensembles[d % 2]]);
  rows.push([researcher.id, 12, 20, null], [researcher.id, 7, 6, null]);
  for (const [userId, h, ago, ensembleId] of rows) {
    for (const [kind, x] of [["reserve", h * 1.25], ["charge", h], ["release", h * 0.25]] as const) {
      await db().sequelize.query("INSERT INTO ledger_entries (allocation_id, kind, core_hours, user_id, ensemble_id, note, created_at) VALUES ($1, $2, $3, $4, $5, 'e2e use', $6)",
        { type: QueryTypes.INSERT, bind: [id, kind, x, userId, ensembleId, new Date(Date.now() - ago * DAY)] });
    }
  }
}

describe("allocations in the browser", () => {
  it("a coordinator grants an allocation, sets a cap and sees the burn-rate chart", async () => {
    await page.goto("/allocations");
    await page.getByRole("heading", { level: 1, name: "Allocations" }).waitFor();
    await page.getByLabel("Group").selectOption({ label: groupName });
    await page.getByLabel("Name", { exact: true }).fill(allocName);
    await page.getByLabel("Period starts").fill(isoDay(Date.now() - 30 * DAY));
    await page.getByLabel("Period ends").fill(isoDay(Date.now() + 60 * DAY));
    await page.getByLabel("Core-hours granted").fill("400");
    await page.getByLabel("Note").fill("e2e grant");
    await shot(page, "allocations-grant-form");
    await page.getByRole("button", { name: "Grant" }).click();
    await page.waitForURL(ALLOC_URL);
    allocationId = ALLOC_URL.exec(page.url())![1];
    expect(await page.getByTestId("tile-given").textContent()).toBe("400");

    await backdatedUse(allocationId);
    await setCap({ actorId: null, ip: null, requestId: null }, allocationId, { subject: "person", userId: dana.id, coreHours: 250, reason: "e2e: the heavy user" });
    await page.reload();
    await page.getByLabel("Cap for").selectOption("everyone");
    await page.getByLabel("Cap amount").fill("5");
    await page.getByLabel("Cap unit").selectOption("share");
    await page.getByLabel("Cap reason").fill("five percent each");
    await page.getByRole("button", { name: "Set cap" }).click();
    await page.getByTestId("cap-status").filter({ hasText: "✓ cap set" }).waitFor();
    await page.getByTestId("caps").filter({ hasText: "5 % of the grant" }).waitFor();

    // charged: Dana 10 × (10..22) + Rhea 19; the chart has both lines and today's marker
    const chart = page.getByTestId("burn-chart");
    await chart.locator(".recharts-line path").first().waitFor();
    expect(await chart.locator(".recharts-line").count()).toBe(2);
    expect(await chart.getByText("today").count()).toBe(1);
    expect(await page.getByTestId("tile-burn-rate").textContent()).toMatch(/^[\d,.]+ \/day$/);
    expect(await page.getByTestId("tile-runs-out").textContent()).toMatch(/^\d{4}-\d\d-\d\d$/);
    const people = await page.getByTestId("usage-by-person").locator("tbody tr").allTextContents();
    expect(people).toHaveLength(2);
    expect(people.find((t) => t.includes("Rhea"))).toMatch(/19.*20.*95 %/);
    // Dana's 152 core-hours split by day parity: days 28, 22, 16, 10, 4 → scan A (10+12+14+16+18 = 70), the rest → scan B (82)
    const ensembles = await page.getByTestId("usage-by-ensemble").locator("tbody tr").allTextContents();
    expect(ensembles).toHaveLength(2);
    expect(ensembles[0]).toMatch(new RegExp(`^e2e scan B ${tag}Dana Heavy ${tag}[a-z]+102\\.582`));
    expect(ensembles[1]).toMatch(new RegExp(`^e2e scan A ${tag}Dana Heavy ${tag}[a-z]+87\\.570`));
    await shot(page, "allocations-coordinator-burn");
  }, 30_000);

  it("the researcher's over-cap submission is refused with what it needed, what is free, the limit and whom to ask", async () => {
    const { context, page: rp } = await newPage(browser);
    await signInToOverview(rp, researcher.email, password);
    const spec = { format: "ergodex.ensemble/1", name: `e2e over cap ${tag}`, sampler: { name: "ising2d", version: "1.0.0" }, fixed: { L: 8, T: 2.3, algorithm: "metropolis" },
      replicas: 1, thermalization: 100, measurements: 100, seed: "42", resources: { cores: 2, wallMinutes: 60 }, allocation: allocName };
    await rp.goto("/ensembles/new");
    await rp.getByRole("tab", { name: "Paste or upload a spec file" }).click();
    await rp.getByLabel("Spec text").fill(JSON.stringify(spec, null, 2));
    const refusal = rp.getByTestId("preview-refusal");
    await refusal.waitFor();
    expect(await rp.getByTestId("preview-limit").textContent()).toBe("Refused by your per-person cap: needs 2 core-h, 1 core-h free");
    const text = await refusal.textContent();
    expect(text).toContain(`needs 2 core-hours, 1 left of your per-person cap of 20 on "${allocName}" (19 used or held; the cap for everyone: 5 % of the grant)`);
    expect(text).toContain(`Ask ${coordinator.name} <${coordinator.email}>.`);
    expect(await rp.getByRole("button", { name: "Submit ensemble" }).isDisabled()).toBe(true);
    await shot(rp, "allocations-refused-preview");

    const res = await rp.request.post("/api/v1/ensembles", { data: spec });
    expect(res.status()).toBe(409);
    const body = (await res.json()) as { error: Record<string, unknown> };
    expect(body.error).toMatchObject({ code: "insufficient_allocation", limit: "person_cap", needed: 2, free: 1, contacts: [{ name: coordinator.name, email: coordinator.email }] });

    await rp.goto(`/allocations/${allocationId}`);
    await rp.getByRole("heading", { name: "Your usage" }).waitFor();
    const rows = await rp.getByTestId("usage-by-person").locator("tbody tr").allTextContents();
    expect(rows).toHaveLength(1);
    expect(rows[0]).toContain("Rhea");
    expect(await rp.getByRole("heading", { name: "Manage" }).count()).toBe(0);
    await shot(rp, "allocations-researcher-view");
    await context.close();
  }, 30_000);
});
