// playwright-core driving Debian's chromium against the running test stack.
import fs from "node:fs";
import path from "node:path";
import { chromium, type Browser, type BrowserContext, type Page } from "playwright-core";
import { env } from "@/lib/env";

export const shotsDir = path.resolve("test-output/screenshots");
const FLAGS = ["--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run", "--disable-background-networking", "--disable-component-update", "--disable-sync"];

export async function launch(): Promise<{ browser: Browser; close: () => Promise<void> }> {
  // launch() gives every browser a fresh temporary profile of its own.
  const browser = await chromium.launch({ executablePath: "/usr/bin/chromium", headless: true, args: FLAGS });
  fs.mkdirSync(shotsDir, { recursive: true });
  return { browser, close: () => browser.close() };
}

export async function newPage(browser: Browser): Promise<{ context: BrowserContext; page: Page }> {
  const context = await browser.newContext({ baseURL: env.appUrl, viewport: { width: 1360, height: 900 } });
  context.setDefaultTimeout(15_000);
  return { context, page: await context.newPage() };
}

export async function signInAs(page: Page, email: string, password: string) {
  await page.goto("/sign-in");
  await page.getByLabel("E-mail").fill(email);
  await page.getByLabel("Password").fill(password);
  await page.getByRole("button", { name: "Sign in" }).click();
}

/** Sign in and wait for the Overview page that follows a good sign-in. */
export async function signInToOverview(page: Page, email: string, password: string) {
  await signInAs(page, email, password);
  await page.getByRole("heading", { name: "Overview" }).waitFor();
}

export const shot = (page: Page, name: string) => page.screenshot({ path: path.join(shotsDir, `${name}.png`), fullPage: true });
