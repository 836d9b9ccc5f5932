// A researcher submits a tiny ising2d ensemble from the form, sees the preview, watches the run grid
// reach done without a page reload, and opens a run; a second ensemble whose wall time (1 minute) is far
// too short for its thermalization fails at run time (wall_time_exceeded) and its failure e-mail shows
// in the admin's Mailbox; it is resubmitted and cancelled from its page; a viewer of another group gets
// "not found" for the ensemble and its run.
import crypto from "node:crypto";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Browser, BrowserContext, Page } from "playwright-core";
import { launch, newPage, signInToOverview, shot } from "./support/browser";
import { stateCount, until } from "./support/wait";
import { DEMO_PEOPLE } from "@/lib/seed/demo-scenario";
import { concise } from "@/lib/format";
import { coreHoursFine } from "@/components/ensembles/core-hours";
import { deriveSeed, expandSpec, parseSpec } from "@/lib/spec";
import { EXAMPLE_SPEC } from "@/components/ensembles/example-spec";
import { hashPassword } from "@/lib/auth/passwords";
import { db } from "@/models";

const researcher = DEMO_PEOPLE.find((p) => p.role === "researcher")!;
const admin = DEMO_PEOPLE.find((p) => p.role === "admin")!;
const tag = crypto.randomBytes(3).toString("hex");
const tinyName = `e2e tiny scan ${tag}`;
const failingName = `e2e wall time too short ${tag}`;
const CONCISE = /^−?\d+(\.\d+)?\(\d+\)$/;
const ENSEMBLE_URL = /\/ensembles\/([0-9a-f-]{36})$/;

// Runs at run time, not at submit: 10^8 thermalization sweeps of a 64×64 lattice take far longer than the 1-minute wall time.
const failingSpec = {
  format: "ergodex.ensemble/1", name: failingName, sampler: { name: "ising2d", version: "1.0.0" },
  fixed: { L: 64, T: 2.2, algorithm: "metropolis" }, replicas: 1, thermalization: 100_000_000, measurements: 1000, interval: 1,
  seed: "777", resources: { cores: 1, wallMinutes: 1 }, retry: { maxAttempts: 1 }, notify: { onFailure: true }, tags: ["e2e", `t${tag}`],
};

let browser: Browser;
let close: () => Promise<void>;
let ctx: BrowserContext;
let page: Page;
let tinyId = "";
let failingId = "";
let tinyRunId = "";
beforeAll(async () => {
  ({ browser, close } = await launch());
  ({ context: ctx, page } = await newPage(browser));
  await signInToOverview(page, researcher.email, researcher.password);
});
afterAll(async () => close?.());

describe("ensembles in the browser", () => {
  it("the empty state's example spec is a valid spec: 7 points × 2 replicas", () => {
    const { points, runs } = expandSpec(parseSpec(structuredClone(EXAMPLE_SPEC)));
    expect([points.length, runs.length]).toEqual([7, 14]);
  });

  it("the form checks live, previews points, runs, seeds and core-hours, and submits", async () => {
    await page.goto("/ensembles");
    await page.getByRole("heading", { name: "Ensembles" }).waitFor();
    // a fresh test stack has no ensemble yet: the page teaches how to submit one
    await until("the list or its empty state", async () => (await page.getByTestId("ensembles-empty").count()) + (await page.locator("tr[data-ensemble]").count()) > 0, 15_000, 300);
    await shot(page, "ensembles-list-before");
    await page.getByRole("link", { name: "New ensemble" }).first().click();
    await page.getByTestId("new-ensemble").waitFor();
    await page.getByLabel("Name", { exact: true }).fill(tinyName);
    await page.getByLabel("L", { exact: true }).fill("8");
    await page.getByRole("button", { name: "+ Scan a parameter" }).click();
    await expect(page.getByLabel("scan 1 parameter").inputValue()).resolves.toBe("T");
    await page.getByLabel("scan 1 from").fill("2.0");
    await page.getByLabel("scan 1 to").fill("2.6");
    await page.getByLabel("scan 1 points").fill("2");
    await page.getByLabel("Replicas per point").fill("2");
    await page.getByLabel("Thermalization").fill("200");
    await page.getByLabel("Wall time (minutes)").fill("5");
    await page.getByLabel("Tags").fill(`e2e, t${tag}`);
    // live validation: an impossible value is named at its field, then fixed
    await page.getByLabel("Measurements", { exact: true }).fill("0");
    await page.getByText("must be >= 1").first().waitFor();
    expect(await page.getByTestId("preview-problems").textContent()).toContain("/measurements");
    await shot(page, "ensemble-form-invalid");
    await page.getByLabel("Measurements", { exact: true }).fill("300");
    await page.getByTestId("preview-ok").waitFor();
    expect(await page.getByTestId("preview-points").textContent()).toBe("2");
    expect(await page.getByTestId("preview-runs").textContent()).toBe("4");
    // cores × wall time × runs = 1 × 5/60 h × 4
    expect(await page.getByTestId("preview-core-hours").textContent()).toBe(`${coreHoursFine((1 * 5 * 4) / 60)} core-h`);
    const master = await page.getByLabel("Master seed").inputValue();
    const seedRows = await page.getByTestId("preview-seeds").locator("tbody tr").allTextContents();
    expect(seedRows).toHaveLength(4);
    const shown = await page.getByTestId("preview-seeds").locator("tbody tr td.mono").allTextContents();
    expect(shown).toEqual([[0, 0], [0, 1], [1, 0], [1, 1]].map(([p, r]) => deriveSeed(master, p, r)));
    await shot(page, "ensemble-form-preview");
    await page.getByRole("button", { name: "Submit ensemble" }).click();
    await page.waitForURL(ENSEMBLE_URL);
    tinyId = ENSEMBLE_URL.exec(page.url())![1];
    await page.getByTestId("run-grid").waitFor();
    expect(await page.getByTestId("run-grid").locator("[data-run]").count()).toBe(4);
    expect(await page.getByTestId("reserved").textContent()).toBe(coreHoursFine((1 * 5 * 4) / 60));
  }, 60_000);

  it("a spec file pasted into the form submits the deliberately failing ensemble", async () => {
    const p2 = await ctx.newPage();
    await p2.goto("/ensembles/new");
    await p2.getByRole("tab", { name: "Paste or upload a spec file" }).click();
    await p2.getByLabel("Spec text").fill(JSON.stringify(failingSpec, null, 2));
    await p2.getByTestId("preview-ok").waitFor();
    expect(await p2.getByTestId("preview-runs").textContent()).toBe("1");
    await p2.getByRole("button", { name: "Submit ensemble" }).click();
    await p2.waitForURL(ENSEMBLE_URL);
    failingId = ENSEMBLE_URL.exec(p2.url())![1];
    await p2.close();
  }, 30_000);

  it("the tiny ensemble's progress bars reach done live, without a page reload", async () => {
    await page.evaluate(() => { (window as unknown as { __sameDocument: boolean }).__sameDocument = true; });
    let midShot = false;
    await until("4 runs done", async () => {
      if (!midShot && (await stateCount(page, "running")) + (await stateCount(page, "collecting")) > 0) { midShot = true; await shot(page, "ensemble-running"); }
      const failed = await stateCount(page, "failed");
      if (failed > 0) throw new Error(`${failed} run(s) failed`);
      return (await stateCount(page, "done")) === 4;
    }, 150_000, 1_000);
    expect(await page.evaluate(() => (window as unknown as { __sameDocument?: boolean }).__sameDocument)).toBe(true);
    expect(await page.getByTestId("ensemble-progress").textContent()).toBe("100 %");
    const cells = page.getByTestId("run-grid").locator("[data-run]");
    expect(await cells.evaluateAll((els) => els.map((e) => `${e.getAttribute("data-state")} ${e.getAttribute("data-progress")}`))).toEqual(Array(4).fill("done 100"));
    await until("ensemble state done", async () => (await page.getByTestId("ensemble-state").textContent())?.includes("done"), 20_000);
    await shot(page, "ensemble-done");
    tinyRunId = (await cells.first().getAttribute("data-run"))!;
  }, 170_000);

  it("a run shows its events, parameters, seed and estimates in concise notation with tau_int", async () => {
    await page.getByTestId("run-grid").locator(`[data-run="${tinyRunId}"]`).click();
    await page.waitForURL(new RegExp(`/runs/${tinyRunId}$`));
    expect(await page.getByTestId("run-state").textContent()).toContain("done");
    expect(await page.getByTestId("seed").textContent()).toMatch(/^\d+$/);
    const api = (await (await page.request.get(`/api/v1/runs/${tinyRunId}`)).json()).data as { estimates: { observable: string; mean: number; error: number }[]; seed: string };
    expect(await page.getByTestId("seed").textContent()).toBe(api.seed);
    // every series column of ising2d has an estimate (derived ones such as chi may come beside them)
    expect(api.estimates.map((e) => e.observable)).toEqual(expect.arrayContaining(["absM", "e", "m2", "m4"]));
    for (const e of api.estimates) {
      const row = page.getByTestId("estimates").locator(`tr[data-observable="${e.observable}"]`);
      const text = (await row.getByTestId("estimate").textContent())!;
      expect(text).toMatch(CONCISE);
      expect(text).toBe(concise(e.mean, e.error));
      expect((await row.getByTestId("tau").textContent())!.trim()).not.toBe("—");
    }
    const causes = await page.getByTestId("events").getByTestId("event-cause").allTextContents();
    expect(causes.length).toBeGreaterThanOrEqual(5); // created, dispatched, running, collecting, done
    await shot(page, "run-done");
  }, 30_000);

  it("the list filters by tag and state in the URL", async () => {
    await page.goto(`/ensembles?tag=t${tag}`);
    const table = page.getByTestId("ensembles");
    await until("both e2e ensembles listed", async () => (await table.locator("tbody tr[data-ensemble]").count()) === 2, 15_000, 500);
    await page.getByLabel("State").selectOption("done");
    await page.waitForURL(/state=done/);
    await until("only the done one", async () => {
      const ids = await table.locator("tbody tr[data-ensemble]").evaluateAll((els) => els.map((e) => e.getAttribute("data-ensemble")));
      return ids.length === 1 && ids[0] === tinyId;
    }, 15_000, 500);
    expect(page.url()).toContain(`tag=t${tag}`);
    await shot(page, "ensembles-list-filtered");
  }, 30_000);

  it("the failing ensemble ends failed with wall_time_exceeded, and the Mailbox has its e-mail", async () => {
    await page.goto(`/ensembles/${failingId}`);
    await until("the run failed", async () => (await stateCount(page, "failed")) === 1, 150_000, 2_000);
    await shot(page, "ensemble-failed");
    await page.getByTestId("run-grid").locator("[data-run]").first().click();
    await page.waitForURL(/\/runs\//);
    await page.getByText("wall_time_exceeded").first().waitFor();
    await shot(page, "run-failed");
    const { context, page: adminPage } = await newPage(browser);
    await signInToOverview(adminPage, admin.email, admin.password);
    await until("the failure e-mail in the Mailbox", async () => {
      await adminPage.goto("/mailbox");
      return (await adminPage.locator("main").textContent())?.includes(failingName);
    }, 60_000, 3_000);
    // the digest says which ensemble and why, and links to it
    await adminPage.getByTestId("mailbox").getByText(failingName).first().click();
    const text = adminPage.getByTestId("mail-text");
    await until("the e-mail's text", async () => (await text.textContent())?.includes(`/ensembles/${failingId}`), 15_000, 500);
    expect(await text.textContent()).toContain("wall");
    await shot(adminPage, "mailbox-failure");
    await context.close();
  }, 240_000);

  it("the failed run is resubmitted, then the ensemble cancelled, each after a confirmation", async () => {
    await page.goto(`/ensembles/${failingId}`);
    await page.getByRole("button", { name: "Resubmit failed (1)…" }).click();
    await page.getByRole("alertdialog").getByRole("button", { name: "Yes, resubmit" }).click();
    await page.getByRole("status").getByText("Queued 1 run again.").waitFor();
    await until("the run queued again", async () => (await stateCount(page, "failed")) === 0, 15_000, 500);
    await page.getByRole("button", { name: "Cancel ensemble…" }).click();
    await page.getByRole("alertdialog").getByRole("button", { name: "Yes, cancel" }).click();
    await page.getByRole("status").getByText(/^Cancelled 1 run[.:]/).waitFor();
    // a queued run ends at once; one already on the cluster is stopped by the broker's cancel job
    await until("the run cancelled", async () => (await stateCount(page, "cancelled")) === 1, 45_000, 1_000);
    expect(await page.getByTestId("ensemble-state").textContent()).toContain("cancelled");
    await shot(page, "ensemble-cancelled");
  }, 90_000);

  it("a viewer of another group gets not-found for the ensemble and its run", async () => {
    const m = db();
    const group = await m.Group.create({ slug: `e2e-other-${tag}`, name: `Other group ${tag}`, institute: "e2e" });
    const email = `viewer.${tag}@other.example`;
    const user = await m.User.create({ email, name: `Other viewer ${tag}`, role: "viewer", passwordHash: await hashPassword("other-viewer-pass") });
    await m.Membership.create({ userId: user.id, groupId: group.id, isLead: false });
    const { context, page: p } = await newPage(browser);
    await signInToOverview(p, email, "other-viewer-pass");
    await p.goto(`/ensembles/${tinyId}`);
    await p.getByTestId("not-found").waitFor();
    await p.goto(`/runs/${tinyRunId}`);
    await p.getByTestId("not-found").waitFor();
    expect((await p.request.get(`/api/v1/ensembles/${tinyId}`)).status()).toBe(404);
    await shot(p, "run-not-found-other-group");
    await context.close();
  }, 30_000);
});
