// A PI traces a run in the browser: its provenance page shows the chain (run → import → estimates) and the graph,
// a replay of the run says "identical", a click leads to an estimate's provenance, PROV-JSON downloads;
// then the Audit page, filtered to the replay.
import crypto from "node:crypto";
import fs from "node:fs";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Browser, Page } from "playwright-core";
import { launch, newPage, shotsDir, signInToOverview, shot } from "./support/browser";
import { until } from "./support/wait";
import { DEMO_PEOPLE } from "@/lib/seed/demo-scenario";
import { db } from "@/models";

const pi = DEMO_PEOPLE.find((p) => p.role === "pi")!;
const tag = crypto.randomBytes(3).toString("hex");
const spec = {
  format: "ergodex.ensemble/1", name: `e2e provenance ${tag}`, sampler: { name: "ising2d", version: "1.0.0" },
  fixed: { L: 6, algorithm: "metropolis" }, scan: [{ param: "T", values: [2.2] }], replicas: 2,
  thermalization: 100, measurements: 300, interval: 1, seed: "20261202",
  resources: { cores: 1, wallMinutes: 5 }, retry: { maxAttempts: 1 }, notify: { onFailure: false }, tags: ["e2e", `p${tag}`],
};

let browser: Browser;
let close: () => Promise<void>;
let page: Page;
let runId = "";

beforeAll(async () => {
  ({ browser, close } = await launch());
  ({ page } = await newPage(browser));
  await signInToOverview(page, pi.email, pi.password);
  const res = await page.request.post("/api/v1/ensembles", { data: spec });
  expect(res.status()).toBe(201);
  const ensembleId = ((await res.json()) as { data: { ensembleId: string } }).data.ensembleId;
  await until("the ensemble done", async () => {
    const d = ((await (await page.request.get(`/api/v1/ensembles/${ensembleId}`)).json()) as { data: { state: string } }).data;
    if (d.state === "failed" || d.state === "cancelled") throw new Error(`ensemble ${d.state}`);
    return d.state === "done";
  }, 120_000, 1_000);
  runId = (await db().Run.findOne({ where: { ensembleId }, order: [["replica", "ASC"]] }))!.id;
}, 150_000);
afterAll(async () => close?.());

describe("provenance and audit in the browser", () => {
  it("the run's provenance page shows the chain and the graph, and a replay says identical", async () => {
    await page.goto(`/provenance/runs/${runId}`);
    await page.getByRole("heading", { name: `Provenance of run ${runId.slice(0, 8)}` }).waitFor();
    const steps = page.getByTestId("chain-step");
    // the run, its import, and one derivation per run estimate (ising2d: e, absM, m2, m4 and the derived U4, chi, C)
    expect(await steps.first().getAttribute("data-id")).toBe(`run:${runId}`);
    expect(await page.locator(`[data-testid=chain-step][data-id^="imp:"]`).count()).toBe(1);
    expect(await page.locator(`[data-testid=chain-step][data-id$="/derivation"]`).count()).toBe(7);
    // who submitted it, with which seed and code hash; the archived series with its sha256
    const run = page.locator(`[data-testid=chain-step][data-id="run:${runId}"]`);
    await expect(run.getByText(pi.name).first().isVisible()).resolves.toBe(true);
    expect(await run.getByText(/^sha256:[0-9a-f]{64}$/).count()).toBeGreaterThan(0);
    const graph = page.getByTestId("prov-graph");
    expect(await graph.locator("[data-node]").count()).toBeGreaterThan(15);
    expect(await graph.locator(`a[href="/runs/${runId}"]`).count()).toBe(1);
    await page.getByTestId("replay-button").click();
    await page.getByTestId("replay-progress").waitFor();
    await page.locator(`[data-testid=replay-result][data-state="identical"]`).waitFor({ timeout: 60_000 });
    await shot(page, "provenance-run");
    await graph.screenshot({ path: `${shotsDir}/provenance-run-graph.png` });
  }, 90_000);

  it("a click on an estimate in the graph opens its provenance, and PROV-JSON downloads", async () => {
    const link = page.getByTestId("prov-graph").locator(`a[href^="/provenance/estimates/"]`).first();
    const href = (await link.getAttribute("href"))!;
    await link.click();
    await page.waitForURL(`**${href}`);
    await page.getByRole("heading", { name: /^Provenance of .+ \(run estimate\)$/ }).waitFor();
    await page.getByTestId("estimate-summary").waitFor();
    // only what this estimate rests on: its own derivation, no other estimate's
    expect(await page.locator(`[data-testid=chain-step][data-id$="/derivation"]`).count()).toBe(1);
    expect(await page.locator(`[data-testid=prov-graph] [data-focus="true"]`).count()).toBe(1);
    await shot(page, "provenance-estimate");
    const [download] = await Promise.all([page.waitForEvent("download"), page.getByTestId("download-prov-json").click()]);
    const doc = JSON.parse(fs.readFileSync((await download.path())!, "utf8")) as { entity: Record<string, unknown>; activity: Record<string, unknown> };
    expect(doc.entity[`est:${href.split("/").pop()}`]).toBeDefined();
    expect(doc.activity[`run:${runId}`]).toBeDefined();
  }, 30_000);

  it("the ensemble's provenance page draws both chains and their point estimates", async () => {
    await page.getByRole("link", { name: "its ensemble's provenance →" }).click();
    await page.getByRole("heading", { name: `Provenance of ${spec.name}` }).waitFor();
    const graph = page.getByTestId("prov-graph");
    expect(await graph.locator(`[data-kind="activity"][data-node^="run:"]`).count()).toBe(2);
    expect(await graph.locator(`a[href^="/provenance/estimates/"]`).count()).toBeGreaterThanOrEqual(7); // a point estimate per observable
    expect(await page.locator(`[data-testid=chain-step][data-id^="run:"]`).count()).toBe(2);
    // the long chain folds each run's analyses into one line that opens
    expect(await page.getByTestId("chain-group").count()).toBe(3); // two runs' analyses and the point combinations
    await page.getByTestId("chain-group").first().locator("summary").click();
    await page.getByTestId("chain-group").first().getByTestId("chain-step").first().waitFor();
    await shot(page, "provenance-ensemble");
    await graph.screenshot({ path: `${shotsDir}/provenance-ensemble-graph.png` });
  }, 30_000);

  it("the Audit page lists the replay; filtering by action keeps only replay entries", async () => {
    await page.getByRole("link", { name: "Audit" }).click();
    await page.getByRole("heading", { name: "Audit" }).waitFor();
    await page.getByLabel("filter by action").fill("run.replay");
    await page.getByRole("button", { name: "Filter" }).click();
    await page.waitForURL(/action=run\.replay/);
    const actions = await page.getByTestId("audit-row").evaluateAll((rows) => rows.map((r) => r.getAttribute("data-action")));
    expect(actions.length).toBeGreaterThanOrEqual(2); // this test's request and its completion
    expect(actions.every((a) => a!.startsWith("run.replay"))).toBe(true);
    expect(actions).toContain("run.replay.finished");
    expect(await page.getByTestId("audit-row").locator(`a[href="/provenance/runs/${runId}"]`).count()).toBeGreaterThanOrEqual(2);
    await shot(page, "audit-filtered");
  }, 30_000);
});
