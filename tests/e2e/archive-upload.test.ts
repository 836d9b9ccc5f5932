// A researcher uploads a .zip of eight result bundles on the Archive page: after the upload bar, the
// import bar moves bundle by bundle (never backwards, several distinct steps), names the bundle and its
// step, lists outcomes as they come, and ends with every bundle accepted. Screenshots mid-import and after.
import crypto from "node:crypto";
import fs from "node:fs";
import path from "node:path";
import { afterAll, beforeAll, expect, it } from "vitest";
import type { Browser, Page } from "playwright-core";
import { launch, newPage, signInToOverview, shot } from "./support/browser";
import { DEMO_PEOPLE } from "@/lib/seed/demo-scenario";
import { cleanupTemp, copyBundle, editManifest, tempDir } from "@/tests/integration/importer/bundles";
import { filesOf, goodBundle, zipOf } from "@/tests/integration/uploads/support";

const researcher = DEMO_PEOPLE.find((p) => p.role === "researcher")!;
const BUNDLES = 8;
let browser: Browser;
let close: () => Promise<void>;
let page: Page;
let zipFile = "";

beforeAll(async () => {
  // One sampler run, then copies that differ in run id (so each has its own hash and is imported).
  const source = goodBundle(String(crypto.randomInt(1, 2 ** 47)), undefined, 20_000);
  const items: [string, Buffer][] = [];
  for (let k = 0; k < BUNDLES; k++) {
    const dir = copyBundle(source);
    editManifest(dir, (m) => { m.runId = crypto.randomUUID(); });
    items.push(...filesOf(dir, `outside-${k}/`));
  }
  zipFile = path.join(tempDir("ergodex-e2e-upload-"), "eight-bundles.zip");
  fs.writeFileSync(zipFile, await zipOf(items));
  ({ browser, close } = await launch());
  ({ page } = await newPage(browser));
  await signInToOverview(page, researcher.email, researcher.password);
});
afterAll(async () => { await close?.(); cleanupTemp(); });

it("shows the import's real progress per bundle, then every outcome", async () => {
  await page.goto("/archive");
  await page.getByRole("heading", { name: "Upload result bundles" }).waitFor();
  // Record every value the import bar takes (a MutationObserver sees each React update).
  await page.evaluate(() => {
    const seen: number[] = [];
    (window as unknown as { importBar: number[] }).importBar = seen;
    new MutationObserver(() => {
      const bar = document.querySelector('[aria-label="import progress"]');
      const v = bar ? Number(bar.getAttribute("aria-valuenow")) : NaN;
      if (Number.isFinite(v) && seen.at(-1) !== v) seen.push(v);
    }).observe(document.body, { subtree: true, childList: true, attributes: true });
  });
  await page.getByLabel("bundle files or archive").setInputFiles(zipFile);
  await page.getByRole("button", { name: "Upload files" }).click();
  const status = page.getByRole("status");
  await status.getByText(new RegExp(`Importing: [1-${BUNDLES - 1}] of ${BUNDLES} bundles done`)).waitFor({ timeout: 60_000 });
  await shot(page, "archive-import-progress");
  const results = page.getByRole("list", { name: "upload results" });
  await results.getByText("✓ accepted").nth(BUNDLES - 1).waitFor({ timeout: 60_000 });
  await expect.poll(() => page.getByRole("status").count()).toBe(0);
  expect(await results.getByText("✓ accepted").count()).toBe(BUNDLES);
  await shot(page, "archive-import-done");
  const values = await page.evaluate(() => (window as unknown as { importBar: number[] }).importBar);
  expect(values.length, JSON.stringify(values)).toBeGreaterThanOrEqual(4);
  expect([...values].sort((a, b) => a - b)).toEqual(values); // never backwards
  expect(values.every((v) => v >= 0 && v <= 100)).toBe(true);
});
