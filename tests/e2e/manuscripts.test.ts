// A PI builds a manuscript in the browser: creates it, puts two explorer views into it (one with "Add to manuscript",
// one saved and picked in the manuscript's form), freezes it, verifies it (live progress, then "verified" per exhibit),
// downloads the bundle and checks it as a collaborator would (every SHA256SUMS line against its file); a viewer of the
// group reads the frozen manuscript without any control and the server refuses them; the PI unfreezes with a reason.
// The data: three ising2d runs of a tiny temperature scan, made by the sampler CLI here and uploaded to a group of its own.
import crypto from "node:crypto";
import fs from "node:fs";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Browser, Page } from "playwright-core";
import yauzl from "yauzl";
import { launch, newPage, signInAs, signInToOverview, shot } from "./support/browser";
import { until } from "./support/wait";
import { DEMO_PEOPLE } from "@/lib/seed/demo-scenario";
import { resolveArchived } from "@/lib/storage/archive-path";
import { db } from "@/models";
import type { Run } from "@/models";
import { cleanupTemp, sampleBundle } from "@/tests/integration/importer/bundles";
import { filesOf, zipOf } from "@/tests/integration/uploads/support";

const admin = DEMO_PEOPLE.find((p) => p.role === "admin")!;
const tag = crypto.randomBytes(3).toString("hex");
const TEMPS = [2.05, 2.35, 2.65];
const PI = { email: `pi.${tag}@ms.example`, password: "ms-pi-pass-1", name: `Imke Sorrel ${tag}` };
const VIEWER = { email: `viewer.${tag}@ms.example`, password: "ms-viewer-pass-1", name: `Ansel Brook ${tag}` };
const RESEARCHER = { email: `researcher.${tag}@ms.example`, password: "ms-research-pass-1", name: `Lio Farrant ${tag}` };
const TITLE = `Energy of small Ising lattices ${tag}`;

let browser: Browser;
let close: () => Promise<void>;
let page: Page;
let groupId = "";
let ensembleId = "";
let msId = "";

type Detail = { state: string; exhibits: { label: string; snapshot: { estimates: unknown[]; runs: string[]; files: { path: string; sha256: string }[] } | null }[]; latestVerification: { id: string; state: string; itemsDone: number; itemsTotal: number; report: { filesChecked: number; estimatesChecked: number } } | null };
const detail = async (p: Page) => ((await (await p.request.get(`/api/v1/manuscripts/${msId}`)).json()) as { data: Detail }).data;
const sha = (b: Buffer) => crypto.createHash("sha256").update(b).digest("hex");

function unzip(file: string): Promise<Map<string, Buffer>> {
  return new Promise((resolve, reject) => {
    yauzl.open(file, { lazyEntries: true }, (err, zip) => {
      if (err || !zip) return reject(err);
      const out = new Map<string, Buffer>();
      zip.on("entry", (e: yauzl.Entry) => zip.openReadStream(e, (er, s) => {
        if (er || !s) return reject(er);
        const chunks: Buffer[] = [];
        s.on("data", (c: Buffer) => chunks.push(c)).on("end", () => { out.set(e.fileName, Buffer.concat(chunks)); zip.readEntry(); });
      }));
      zip.on("end", () => resolve(out)).on("error", reject);
      zip.readEntry();
    });
  });
}

beforeAll(async () => {
  ({ browser, close } = await launch());
  // a group of its own, so the exhibits select only this test's runs; its PI leads it, its viewer only reads
  groupId = (await db().Group.create({ slug: `e2e-ms-${tag}`, name: `Manuscript group ${tag}`, institute: "e2e" })).id;
  const { context, page: a } = await newPage(browser);
  await signInToOverview(a, admin.email, admin.password);
  for (const [p, role] of [[PI, "pi"], [VIEWER, "viewer"], [RESEARCHER, "researcher"]] as const) {
    const res = await a.request.post("/api/v1/people", { data: { email: p.email, name: p.name, role, password: p.password, groupIds: [groupId] } });
    expect(res.status()).toBe(201);
    if (role === "pi") {
      const id = ((await res.json()) as { data: { id: string } }).data.id;
      expect((await a.request.put(`/api/v1/people/${id}/memberships/${groupId}`, { data: { member: true, isLead: true } })).status()).toBe(200);
    }
  }
  await context.close();
  ({ page } = await newPage(browser));
  await signInToOverview(page, PI.email, PI.password);
}, 60_000);
afterAll(async () => { cleanupTemp(); await close?.(); });

describe("a manuscript from explorer views to a checked bundle", () => {
  it("three runs of a temperature scan, run by the sampler CLI, are uploaded to the group", async () => {
    const items = TEMPS.flatMap((T, i) => filesOf(sampleBundle({ id: crypto.randomUUID(), seed: String(9100 + i) } as Run, { L: 6, T, algorithm: "metropolis" }, { measurements: 300 }), `run-${i}/`));
    const res = await page.request.post(`/api/v1/imports?group=${groupId}`, { data: await zipOf(items), headers: { "content-type": "application/zip", "x-file-name": "scan.zip" } });
    expect(res.status()).toBe(201);
    const body = ((await res.json()) as { data: { accepted: number; bundles: { ensembleId: string }[] } }).data;
    expect(body.accepted).toBe(3);
    ensembleId = body.bundles[0].ensembleId;
  }, 30_000);

  it("the PI creates the manuscript and adds a plot from the explorer with “Add to manuscript”", async () => {
    await page.goto("/manuscripts");
    const form = page.getByRole("form", { name: "New manuscript" });
    await form.getByLabel("Working title").fill(TITLE);
    await form.getByLabel("Target journal").fill("Phys. Rev. E");
    await form.getByRole("button", { name: "Create manuscript" }).click();
    await page.waitForURL(/\/manuscripts\/[0-9a-f-]{36}$/);
    msId = /\/manuscripts\/([0-9a-f-]{36})$/.exec(page.url())![1];
    await page.getByRole("heading", { name: TITLE }).waitFor();
    expect(await page.getByTestId("manuscript-state").getAttribute("data-state")).toBe("draft");

    await page.goto(`/explorer?ensemble=${ensembleId}&observable=e&x=T`);
    await until("3 point estimates of e", async () => (await page.getByTestId("explorer-table").locator("tr[data-estimate]").count()) === 3, 15_000, 300);
    await page.getByText("Add to manuscript", { exact: true }).click();
    const add = page.getByRole("form", { name: "Add to manuscript" });
    await add.getByLabel("Manuscript").selectOption(msId);
    await add.getByLabel("Exhibit label").fill("Fig. 1");
    await add.getByLabel("Exhibit caption").fill("Energy per site against temperature, L = 6");
    await add.getByRole("button", { name: "Add exhibit" }).click();
    await page.getByTestId("exhibit-added").waitFor();
    await shot(page, "manuscript-explorer-add");
  }, 40_000);

  it("a second view, saved in the explorer, becomes Table 1 through the manuscript's form; both preview what they hold", async () => {
    await page.goto(`/explorer?ensemble=${ensembleId}&observable=absM&scope=run`);
    await until("3 run estimates of absM", async () => (await page.getByTestId("explorer-table").locator("tr[data-estimate]").count()) === 3, 15_000, 300);
    await page.getByLabel("View name").fill(`absM per run ${tag}`);
    await page.getByRole("button", { name: "Save view" }).click();
    await page.getByTestId("view-saved").waitFor();
    await page.goto(`/manuscripts/${msId}`);
    const form = page.getByRole("form", { name: "Add exhibit" });
    await form.getByLabel("Label").fill("Table 1");
    await form.getByLabel("Saved view").selectOption({ label: `absM per run ${tag}` });
    await form.getByRole("button", { name: "Add exhibit" }).click();
    const cards = page.getByTestId("exhibit");
    await until("two exhibits", async () => (await cards.count()) === 2, 10_000, 300);
    const fig = page.locator('[data-testid="exhibit"][data-label="Fig. 1"]');
    const table = page.locator('[data-testid="exhibit"][data-label="Table 1"]');
    expect(await fig.getByTestId("count-estimates").textContent()).toBe("3");
    expect(await table.getByTestId("count-estimates").textContent()).toBe("3");
    expect(await table.getByTestId("exhibit-plot").count()).toBe(0); // a table shows counts, no plot
    await until("the preview's error bars", async () => (await fig.locator(".recharts-errorBar").count()) === 3, 10_000, 300);
    const href = (await fig.getByTestId("open-in-explorer").getAttribute("href"))!;
    const sp = new URL(href, "http://x").searchParams;
    expect([sp.get("ensemble"), sp.get("observable"), sp.get("x")]).toEqual([ensembleId, "e", "T"]);
    // editors: the group's researcher can be added, its viewer is not offered
    const pick = page.getByLabel("Researcher to add as editor");
    expect(await pick.locator("option").allTextContents()).toEqual([`${RESEARCHER.name} (researcher)`]);
    await page.getByRole("button", { name: "Add editor" }).click();
    await until("the editor listed", async () => (await page.getByTestId("collaborators").textContent())?.includes(RESEARCHER.name), 10_000, 300);
    await shot(page, "manuscript-draft");
  }, 40_000);

  it("freezing asks first, then shows what was snapshotted per exhibit", async () => {
    await page.getByRole("button", { name: "Freeze…" }).click();
    const dialog = page.getByRole("dialog", { name: "Confirm freeze" });
    expect(await dialog.textContent()).toContain("6 estimates");
    await shot(page, "manuscript-freeze-confirm");
    await dialog.getByRole("button", { name: "Freeze now" }).click();
    await until("frozen", async () => (await page.getByTestId("manuscript-state").getAttribute("data-state")) === "frozen", 10_000, 300);
    const d = await detail(page);
    for (const x of d.exhibits) {
      const card = page.locator(`[data-testid="exhibit"][data-label="${x.label}"]`);
      expect(await card.getByTestId("count-estimates").textContent()).toBe(String(x.snapshot!.estimates.length));
      expect(await card.getByTestId("count-files").textContent()).toMatch(new RegExp(`^${x.snapshot!.files.length} \\(`));
      expect(x.snapshot!.runs).toHaveLength(3);
      expect(x.snapshot!.files.length).toBeGreaterThanOrEqual(6); // at least manifest and series per run
      await card.getByTestId("snapshot-hash").waitFor();
    }
    expect(await page.getByRole("button", { name: "Freeze…", exact: true }).count()).toBe(0);
    // the totals count each run and file once, though both exhibits rest on the same three runs
    const files = new Set(d.exhibits.flatMap((x) => x.snapshot!.files.map((f) => f.sha256)));
    expect(await page.getByTestId("snapshot-summary").textContent()).toContain(`3 runs and ${files.size} archived files`);
  }, 30_000);

  it("verify shows its progress, then “verified” for each exhibit", async () => {
    await page.getByRole("button", { name: "Verify" }).click();
    // the bar appears while the job is queued or running (a determinate bar: items checked of the total)
    const bar = page.getByTestId("verify-progress").getByRole("progressbar");
    await bar.waitFor({ timeout: 5_000 });
    expect(Number(await bar.getAttribute("aria-valuenow"))).toBeLessThan(100);
    await shot(page, "manuscript-verify-progress");
    await until("verified", async () => (await page.getByTestId("verify-result").getAttribute("data-state").catch(() => null)) === "verified", 20_000, 300);
    const v = (await detail(page)).latestVerification!;
    expect(v.state).toBe("verified");
    // every file and every estimate (6 point-scope inputs are run estimates too) was counted, and done equals total
    expect(v.itemsDone).toBe(v.itemsTotal);
    expect(v.itemsTotal).toBe(v.report.filesChecked + v.report.estimatesChecked);
    expect(await page.getByTestId("verify-result").textContent()).toContain(`${v.report.filesChecked} files and ${v.report.estimatesChecked} estimates checked`);
    const lines = page.getByTestId("verify-exhibit");
    expect(await lines.count()).toBe(2);
    for (const label of ["Fig. 1", "Table 1"]) expect(await page.locator(`[data-testid="verify-exhibit"][data-label="${label}"]`).getAttribute("data-status")).toBe("verified");
    await until("badges after the refresh", async () => (await page.getByTestId("exhibit-verified").count()) === 2, 10_000, 300);
    await shot(page, "manuscript-verified");
  }, 40_000);

  it("the bundle holds README, one CSV per exhibit, PROV-JSON and SHA256SUMS, and every listed hash matches its file", async () => {
    const [download] = await Promise.all([page.waitForEvent("download"), page.getByRole("link", { name: "Download bundle (.zip)" }).click()]);
    const file = (await download.path())!;
    const zip = await unzip(file);
    const names = [...zip.keys()];
    for (const n of ["README.md", "exhibits/01-fig-1.csv", "exhibits/02-table-1.csv", "provenance.prov.json", "SHA256SUMS", "manifest.json"]) expect(names).toContain(n);
    const sums = zip.get("SHA256SUMS")!.toString("utf8").trim().split("\n").map((l) => /^([0-9a-f]{64}) {2}(.+)$/.exec(l)!);
    expect(sums.every(Boolean)).toBe(true);
    // every file of the zip but SHA256SUMS itself and manifest.json (written after it) is listed, with its exact bytes' hash
    expect(new Set(sums.map((m) => m[2]))).toEqual(new Set(names.filter((n) => n !== "SHA256SUMS" && n !== "manifest.json")));
    for (const [, hash, name] of sums) expect(sha(zip.get(name)!), name).toBe(hash);
    const csv = zip.get("exhibits/01-fig-1.csv")!.toString("utf8").trim().split("\n");
    expect(csv.filter((l) => !l.startsWith("#"))).toHaveLength(1 + 3); // header, then the three frozen point estimates
    expect(zip.get("README.md")!.toString("utf8")).toContain("sha256sum -c SHA256SUMS");
    const prov = JSON.parse(zip.get("provenance.prov.json")!.toString("utf8")) as { entity: Record<string, unknown>; activity: Record<string, unknown> };
    expect(Object.keys(prov.entity).some((k) => k.includes(msId))).toBe(true);
    expect(names.filter((n) => n.startsWith("archive/")).length).toBe((await detail(page)).exhibits[0].snapshot!.files.length);
    fs.copyFileSync(file, path.join("test-output", "manuscript-bundle.zip"));
  }, 30_000);

  it("a viewer of the group reads the frozen manuscript with no controls, and the server refuses them", async () => {
    const { context, page: v } = await newPage(browser);
    await signInAs(v, VIEWER.email, VIEWER.password);
    // under load (the whole suite on two cores) a sign-in can take longer than the default 15 s
    await v.getByRole("heading", { name: "Overview" }).waitFor({ timeout: 30_000 }).catch(async (err) => {
      await shot(v, "manuscript-viewer-sign-in");
      throw new Error(`the viewer could not sign in (page says: ${await v.locator("main").innerText().catch(() => "?")}): ${String(err)}`);
    });
    await v.goto(`/manuscripts/${msId}`);
    await v.getByRole("heading", { name: TITLE }).waitFor();
    expect(await v.getByTestId("manuscript-state").getAttribute("data-state")).toBe("frozen");
    expect(await v.getByTestId("exhibit").count()).toBe(2);
    for (const name of ["Freeze…", "Unfreeze…", "Verify"]) expect(await v.getByRole("button", { name, exact: true }).count(), name).toBe(0);
    expect(await v.getByRole("form", { name: "Add exhibit" }).count()).toBe(0);
    expect(await v.getByRole("link", { name: "Download bundle (.zip)" }).count()).toBe(1);
    await shot(v, "manuscript-viewer");
    for (const [what, body] of [["freeze", undefined], ["verify", undefined], ["unfreeze", { reason: "viewer tries" }]] as const) {
      expect((await v.request.post(`/api/v1/manuscripts/${msId}/${what}`, body ? { data: body } : {})).status(), what).toBe(403);
    }
    expect((await detail(page)).state).toBe("frozen");
    await context.close();
  }, 50_000);

  it("a file changed in the archive: verify names it, per exhibit, and the file is put back", async () => {
    const d = await detail(page);
    const f = d.exhibits[0].snapshot!.files.find((x) => /series/.test(x.path))!;
    const row = (await db().Artifact.findByPk(f.sha256))!;
    const file = resolveArchived(row.storagePath);
    const bytes = fs.readFileSync(file);
    fs.chmodSync(file, 0o644);
    fs.writeFileSync(file, Buffer.concat([bytes, Buffer.from("\n")]));
    try {
      await page.reload();
      await page.getByRole("button", { name: "Verify", exact: true }).click();
      await until("the verification's end", async () => (await page.getByTestId("verify-result").getAttribute("data-state").catch(() => null)) === "differs", 20_000, 300);
      // both exhibits rest on this run, so both name the file, its run and what changed
      for (const label of ["Fig. 1", "Table 1"]) {
        const line = page.locator(`[data-testid="verify-exhibit"][data-label="${label}"]`);
        expect(await line.getAttribute("data-status")).toBe("differs");
        const text = (await line.textContent())!;
        expect(text).toContain(f.path);
        expect(text).toContain("content changed");
      }
      await shot(page, "manuscript-verify-differs");
    } finally {
      fs.writeFileSync(file, bytes);
    }
  }, 40_000);

  it("the PI unfreezes with a reason, which the history keeps", async () => {
    await page.getByRole("button", { name: "Unfreeze…" }).click();
    const dialog = page.getByRole("dialog", { name: "Confirm unfreeze" });
    expect(await dialog.getByRole("button", { name: "Unfreeze", exact: true }).isDisabled()).toBe(true); // no reason, no unfreeze
    await dialog.getByLabel("Reason to unfreeze").fill("referee asks for L = 8 as well");
    await dialog.getByRole("button", { name: "Unfreeze", exact: true }).click();
    await until("draft again", async () => (await page.getByTestId("manuscript-state").getAttribute("data-state")) === "draft", 10_000, 300);
    expect(await page.getByTestId("unfreeze-reason").textContent()).toBe("referee asks for L = 8 as well");
    const actions = await page.getByTestId("history").locator("li").evaluateAll((els) => els.map((e) => e.getAttribute("data-action")));
    expect(actions).toEqual(["manuscript.create", "manuscript.exhibit.add", "manuscript.exhibit.add", "manuscript.collaborator.add", "manuscript.freeze", "manuscript.verify", "manuscript.verified", "manuscript.verify", "manuscript.verified", "manuscript.unfreeze"]);
    expect(await page.getByTestId("exhibit-verified").count()).toBe(0); // the verification spoke for the released snapshot
    await shot(page, "manuscript-unfrozen");
    await page.goto("/manuscripts");
    await page.getByRole("link", { name: TITLE }).waitFor();
    await shot(page, "manuscripts-list");
  }, 30_000);
});
