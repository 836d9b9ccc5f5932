// A researcher submits a tiny ising2d temperature scan over the API, waits for it, then in the explorer
// filters to it, plots the energy e against T with error bars, opens a run's analysis, moves its
// thermalisation cut (the estimate changes), saves a new version, and exports the table as CSV;
// a viewer of another group sees none of it.
import crypto from "node:crypto";
import fs from "node:fs";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Browser, Page } from "playwright-core";
import { launch, newPage, signInToOverview, shot } from "./support/browser";
import { until } from "./support/wait";
import { DEMO_PEOPLE } from "@/lib/seed/demo-scenario";
import { concise } from "@/lib/format";
import { db } from "@/models";

const researcher = DEMO_PEOPLE.find((p) => p.role === "researcher")!;
const admin = DEMO_PEOPLE.find((p) => p.role === "admin")!;
const tag = crypto.randomBytes(3).toString("hex");
const TEMPS = [2.0, 2.3, 2.6];
const spec = {
  format: "ergodex.ensemble/1", name: `e2e explorer scan ${tag}`, sampler: { name: "ising2d", version: "1.0.0" },
  fixed: { L: 8, algorithm: "metropolis" }, scan: [{ param: "T", values: TEMPS }], replicas: 2,
  thermalization: 200, measurements: 400, interval: 1, seed: "20261201",
  resources: { cores: 1, wallMinutes: 5 }, retry: { maxAttempts: 1 }, notify: { onFailure: false }, tags: ["e2e", `x${tag}`],
};
const CONCISE = /^−?\d+(\.\d+)?\(\d+\)$/;

let browser: Browser;
let close: () => Promise<void>;
let page: Page;
let ensembleId = "";
let runId = "";

beforeAll(async () => {
  ({ browser, close } = await launch());
  ({ page } = await newPage(browser));
  await signInToOverview(page, researcher.email, researcher.password);
});
afterAll(async () => close?.());

describe("explorer and run analysis in the browser", () => {
  it("a tiny temperature scan submitted over the API finishes: 3 points × 2 replicas", async () => {
    const res = await page.request.post("/api/v1/ensembles", { data: spec });
    expect(res.status()).toBe(201);
    ensembleId = ((await res.json()) as { data: { ensembleId: string } }).data.ensembleId;
    await until("the scan done", async () => {
      const d = ((await (await page.request.get(`/api/v1/ensembles/${ensembleId}`)).json()) as { data: { state: string } }).data;
      if (d.state === "failed" || d.state === "cancelled") throw new Error(`ensemble ${d.state}`);
      return d.state === "done";
    }, 170_000, 1_500);
  }, 180_000);

  it("filters to the scan, plots e against T with one error bar per temperature", async () => {
    await page.goto("/explorer");
    await page.getByRole("heading", { name: "Explorer" }).waitFor();
    await page.getByLabel("Ensemble", { exact: true }).selectOption(ensembleId);
    await page.waitForURL(new RegExp(`ensemble=${ensembleId}`));
    await page.getByLabel("Observable", { exact: true }).selectOption("e");
    await page.waitForURL(/observable=e/);
    await page.getByLabel("x axis", { exact: true }).selectOption("T");
    await until("3 point estimates of e", async () => (await page.getByTestId("explorer-table").locator("tr[data-estimate]").count()) === 3, 15_000, 300);
    // the table shows what the API says, in concise notation
    const api = ((await (await page.request.get(`/api/v1/estimates?ensemble=${ensembleId}&observable=e&sort=param:T&dir=asc`)).json()) as
      { data: { rows: { estimateId: string; mean: number; error: number; params: { T: number } }[]; total: number } }).data;
    expect(api.total).toBe(3);
    expect(api.rows.map((r) => r.params.T)).toEqual(TEMPS);
    for (const r of api.rows) {
      const text = (await page.locator(`tr[data-estimate="${r.estimateId}"]`).getByTestId("estimate").textContent())!;
      expect(text).toMatch(CONCISE);
      expect(text).toBe(concise(r.mean, r.error));
    }
    // energy per site rises with temperature across this range (ordered → disordered): a physics sanity check
    expect(api.rows[0].mean).toBeLessThan(api.rows[2].mean);
    const plot = page.getByTestId("explorer-plot");
    await plot.waitFor();
    await until("error bars drawn", async () => (await plot.locator(".recharts-errorBar").count()) >= 3, 10_000, 300);
    expect(await plot.locator(".recharts-errorBar").count()).toBe(3);
    await page.getByLabel("per-replica points").check();
    await page.waitForURL(/replicas=1/);
    await shot(page, "explorer-plot-e-vs-T");
  }, 60_000);

  it("a run's analysis recomputes the estimate live when the cut moves, and saving keeps the old version", async () => {
    await page.getByLabel("Scope", { exact: true }).selectOption("run");
    await until("6 run estimates", async () => (await page.getByTestId("explorer-table").locator("tr[data-estimate]").count()) === 6, 15_000, 300);
    const link = page.getByTestId("explorer-table").locator('a[href$="/analysis"]').first();
    runId = /\/runs\/([0-9a-f-]{36})\/analysis/.exec((await link.getAttribute("href"))!)![1];
    await link.click();
    await page.waitForURL(new RegExp(`/runs/${runId}/analysis$`));
    await page.getByLabel("Observable", { exact: true }).selectOption("e");
    const live = page.getByTestId("live-estimate");
    await live.waitFor();
    await page.getByTestId("series-chart").waitFor();
    await page.getByTestId("acf-chart").waitFor();
    const before = (await live.textContent())!;
    const autoCut = Number((await page.getByLabel("Thermalisation cut", { exact: true }).inputValue()));
    const newCut = autoCut === 120 ? 150 : 120;
    await page.getByLabel("Thermalisation cut", { exact: true }).fill(String(newCut));
    await until("the estimate with the new cut", async () => (await page.getByTestId("live-cut").textContent())?.startsWith(String(newCut)), 10_000, 200);
    const after = (await live.textContent())!;
    expect(after).toMatch(CONCISE);
    expect(after).not.toBe(before);
    await page.getByRole("button", { name: "Save as new version" }).click();
    await page.getByTestId("saved").waitFor();
    await until("two stored versions", async () => (await page.getByTestId("versions").locator("tr[data-version]").count()) === 2, 10_000, 300);
    expect(await page.getByTestId("versions").locator('tr[data-current="yes"]').getAttribute("data-version")).toBe("2");
    const run = ((await (await page.request.get(`/api/v1/runs/${runId}`)).json()) as { data: { estimates: { observable: string; thermCut: number; version: number }[] } }).data;
    expect(run.estimates.find((e) => e.observable === "e")).toMatchObject({ thermCut: newCut, version: 2 });
    await shot(page, "run-analysis-cut-moved");
  }, 60_000);

  it("exports the table view as CSV with its header block and one line per row", async () => {
    await page.goto(`/explorer?ensemble=${ensembleId}&observable=e&x=T`);
    await until("3 rows", async () => (await page.getByTestId("explorer-table").locator("tr[data-estimate]").count()) === 3, 15_000, 300);
    const [download] = await Promise.all([page.waitForEvent("download"), page.getByRole("link", { name: "Export table as CSV" }).click()]);
    const text = fs.readFileSync((await download.path())!, "utf8");
    const lines = text.split(/\r?\n/).filter(Boolean);
    const header = lines.filter((l) => l.startsWith("# "));
    const body = lines.filter((l) => !l.startsWith("# "));
    expect(header.find((l) => l.startsWith("# query:"))).toContain(ensembleId);
    expect(header.some((l) => l.startsWith("# analysis versions:"))).toBe(true);
    expect(header.some((l) => l.startsWith("# generated by:"))).toBe(true);
    expect(header.find((l) => l.startsWith("# rows:"))).toBe("# rows: 3");
    expect(body).toHaveLength(1 + 3); // column names, then the 3 point estimates
    await shot(page, "explorer-filtered");
  }, 30_000);

  it("a viewer of another group sees none of it", async () => {
    const m = db();
    const group = await m.Group.create({ slug: `e2e-explorer-${tag}`, name: `Explorer outsiders ${tag}`, institute: "e2e" });
    const { context: adminCtx, page: adminPage } = await newPage(browser);
    await signInToOverview(adminPage, admin.email, admin.password);
    const email = `outsider.${tag}@other.example`;
    const made = await adminPage.request.post("/api/v1/people", { data: { email, name: `Outsider ${tag}`, role: "viewer", password: "outsider-pass-1", groupIds: [group.id] } });
    expect(made.status()).toBe(201);
    await adminCtx.close();
    const { context, page: p } = await newPage(browser);
    await signInToOverview(p, email, "outsider-pass-1");
    const est = ((await (await p.request.get(`/api/v1/estimates?ensemble=${ensembleId}`)).json()) as { data: { total: number } }).data;
    expect(est.total).toBe(0);
    const plot = ((await (await p.request.get(`/api/v1/plots/estimates?ensemble=${ensembleId}&observable=e&x=T`)).json()) as { data: { series: unknown[] } }).data;
    expect(plot.series).toHaveLength(0);
    expect((await p.request.get(`/api/v1/runs/${runId}/analysis?observable=e`)).status()).toBe(404);
    await p.goto(`/explorer?ensemble=${ensembleId}&observable=e&x=T`);
    await p.getByRole("heading", { name: "Explorer" }).waitFor();
    await until("the explorer answered", async () => (await p.getByTestId("explorer-empty").count()) + (await p.getByText("No estimate matches these filters").count()) > 0, 15_000, 300);
    expect(await p.locator("tr[data-estimate]").count()).toBe(0);
    await shot(p, "explorer-other-group");
    await p.goto(`/runs/${runId}/analysis`);
    await p.getByTestId("not-found").waitFor();
    await context.close();
  }, 60_000);
});
