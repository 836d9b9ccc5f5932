// Each demo role signs in, sees the dashboard with the seeded figures, and signs out;
// a wrong password is refused; a viewer cannot reach the People page.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Browser } from "playwright-core";
import { launch, newPage, signInAs, signInToOverview, shot } from "./support/browser";
import { DEMO_ALLOCATION, DEMO_PEOPLE } from "@/lib/seed/demo-scenario";
import { coreHours } from "@/lib/format";

let browser: Browser;
let close: () => Promise<void>;
beforeAll(async () => ({ browser, close } = await launch()));
afterAll(async () => close?.());

describe("sign-in in the browser", () => {
  for (const person of DEMO_PEOPLE) {
    it(`${person.role} signs in, sees the seeded dashboard, signs out`, async () => {
      const { context, page } = await newPage(browser);
      await signInToOverview(page, person.email, person.password);
      await expect(page.getByTestId("whoami").textContent()).resolves.toBe(person.name);
      const allocations = page.getByTestId("allocations");
      await expect(allocations.textContent()).resolves.toContain(DEMO_ALLOCATION.name);
      await expect(allocations.textContent()).resolves.toContain(coreHours(DEMO_ALLOCATION.grantCoreHours));
      await expect(page.getByTestId("run-states").textContent()).resolves.toContain("queued");
      const nav = await page.getByRole("navigation", { name: "Areas" }).textContent();
      expect(nav?.includes("People")).toBe(person.role === "admin");
      await shot(page, `overview-${person.role}`);
      await page.getByRole("button", { name: "Sign out" }).click();
      await page.getByRole("heading", { name: "Sign in" }).waitFor();
      await page.goto("/");
      await page.waitForURL(/\/sign-in/);
      await context.close();
    });
  }

  it("a wrong password is refused with the same words as an unknown account", async () => {
    const { context, page } = await newPage(browser);
    await signInAs(page, DEMO_PEOPLE[0].email, "not-the-password");
    const alert = page.getByTestId("sign-in-error");
    await alert.waitFor();
    expect(await alert.textContent()).toBe("wrong e-mail or password");
    await shot(page, "sign-in-refused");
    await page.reload();
    await signInAs(page, "nobody@brannock.example", "not-the-password");
    await alert.waitFor();
    expect(await alert.textContent()).toBe("wrong e-mail or password");
    await context.close();
  });

  it("a viewer cannot reach the People page", async () => {
    const viewer = DEMO_PEOPLE.find((p) => p.role === "viewer")!;
    const { context, page } = await newPage(browser);
    await signInToOverview(page, viewer.email, viewer.password);
    await page.goto("/people");
    await page.getByText("You may not open this page").waitFor();
    expect(await page.getByTestId("people").count()).toBe(0);
    await shot(page, "people-refused-viewer");
    await context.close();
  });

  it("an admin sees the People page with every demo person", async () => {
    const admin = DEMO_PEOPLE.find((p) => p.role === "admin")!;
    const { context, page } = await newPage(browser);
    await signInToOverview(page, admin.email, admin.password);
    await page.goto("/people");
    const table = page.getByTestId("people");
    await table.waitFor();
    for (const p of DEMO_PEOPLE) expect(await table.textContent()).toContain(p.email);
    await shot(page, "people-admin");
    await context.close();
  });
});
