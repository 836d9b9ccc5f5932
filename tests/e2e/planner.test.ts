// The planner in the browser: a researcher's pilot (submitted over the API), then the submit form's planner
// panel predicts from it for half the pilot's error, "Use" fills measurements, wall time and the plan tag,
// the planned ensemble runs, and its page and the Planner page show achieved vs predicted.
import crypto from "node:crypto";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Browser, Page } from "playwright-core";
import { launch, newPage, signInToOverview, shot } from "./support/browser";
import { until } from "./support/wait";
import { DEMO_PEOPLE } from "@/lib/seed/demo-scenario";

const researcher = DEMO_PEOPLE.find((p) => p.role === "researcher")!;
const tag = crypto.randomBytes(3).toString("hex");
const ENSEMBLE_URL = /\/ensembles\/([0-9a-f-]{36})$/;
// off-critical and tiny, so both ensembles take seconds (Tc ≈ 2.269, Onsager 1944)
const POINT = { L: 6, T: 3.1, algorithm: "metropolis" };

let browser: Browser;
let close: () => Promise<void>;
let page: Page;
beforeAll(async () => {
  ({ browser, close } = await launch());
  ({ page } = await newPage(browser));
  await signInToOverview(page, researcher.email, researcher.password);
});
afterAll(async () => close?.());

const stateOf = async (id: string) => ((await (await page.request.get(`/api/v1/ensembles/${id}`)).json()).data as { state: string }).state;

describe("planner in the submit form", () => {
  it("predicts from a pilot, fills the form, and the ended ensemble shows achieved vs predicted", async () => {
    const pilotRes = await page.request.post("/api/v1/ensembles", { data: {
      format: "ergodex.ensemble/1", name: `e2e planner pilot ${tag}`, sampler: { name: "ising2d", version: "1.0.0" }, fixed: POINT,
      replicas: 2, thermalization: 100, measurements: 500, seed: "4242", resources: { cores: 1, wallMinutes: 2 }, tags: ["e2e"],
    } });
    expect(pilotRes.status()).toBe(201);
    const pilotId = ((await pilotRes.json()).data as { ensembleId: string }).ensembleId;
    await until("pilot done", async () => (await stateOf(pilotId)) !== "active", 60_000, 500);
    expect(await stateOf(pilotId)).toBe("done");
    const est = ((await (await page.request.get(`/api/v1/ensembles/${pilotId}/estimates`)).json()).data as { observable: string; error: number }[]).find((e) => e.observable === "e")!;

    await page.goto("/ensembles/new");
    await page.getByTestId("new-ensemble").waitFor();
    await page.getByLabel("Name", { exact: true }).fill(`e2e planned ${tag}`);
    await page.getByLabel("L", { exact: true }).fill(String(POINT.L));
    await page.getByLabel("T", { exact: true }).fill(String(POINT.T));
    await page.getByLabel("Replicas per point").fill("2");
    await page.getByLabel("Thermalization").fill("100");
    await page.getByLabel("Tags").fill("e2e");
    await page.getByTestId("preview-ok").waitFor(); // so the plan is shown beside the form's reservation
    await page.getByLabel("Planner observable").fill("e");
    await page.getByLabel("Target error").fill((est.error / 2).toPrecision(3));
    await page.getByLabel("Pilot ensemble").fill(pilotId);
    await page.getByRole("button", { name: "Predict" }).click();
    await page.getByTestId("planner-result").waitFor();
    const measurements = (await page.getByTestId("planner-measurements").textContent())!.replace(/,/g, "");
    // half the error: about four times the pilot's 500 measurements (each a few % uncertain), plus the cut allowance
    expect(Number(measurements)).toBeGreaterThan(1500);
    expect(Number(measurements)).toBeLessThan(3500);
    await shot(page, "planner-prediction");

    await page.getByTestId("planner-use").click();
    await expect(page.getByLabel("Measurements", { exact: true }).inputValue()).resolves.toBe(measurements);
    expect(await page.getByLabel("Tags").inputValue()).toMatch(/^e2e, plan:[0-9a-f-]{36}$/);
    expect(await page.getByTestId("planner-use").textContent()).toBe("Form follows this plan");
    await page.getByTestId("preview-ok").waitFor();
    await shot(page, "planner-used");
    await page.getByRole("button", { name: "Submit ensemble" }).click();
    await page.waitForURL(ENSEMBLE_URL);
    const plannedId = ENSEMBLE_URL.exec(page.url())![1];
    await until("planned ensemble done", async () => (await stateOf(plannedId)) !== "active", 60_000, 500);

    await page.reload();
    await page.getByTestId("plan-outcome").getByText("achieved ÷ predicted").waitFor();
    await shot(page, "planner-outcome-ensemble");
    await page.goto("/planner");
    await page.getByTestId("planner-record").getByRole("link", { name: `e2e planned ${tag}` }).waitFor();
    await shot(page, "planner-record");
  }, 150_000);
});
