// Polling for pages that change on their own (live progress, arriving e-mail): no fixed sleeps in assertions.
import type { Page } from "playwright-core";

/** Calls `probe` every `everyMs` until it returns a truthy value or `timeoutMs` passes; then throws saying what was awaited. */
export async function until<T>(what: string, probe: () => Promise<T | null | undefined | false>, timeoutMs: number, everyMs = 1_000): Promise<T> {
  const end = Date.now() + timeoutMs;
  let last: unknown = null;
  for (;;) {
    try {
      const v = await probe();
      if (v) return v;
      last = v;
    } catch (err) { last = err; }
    if (Date.now() > end) throw new Error(`gave up waiting for ${what} after ${timeoutMs / 1000} s (last: ${last instanceof Error ? last.message : JSON.stringify(last)})`);
    await new Promise((r) => setTimeout(r, everyMs));
  }
}

/** The run count of a state on an ensemble page (its live counters). */
export async function stateCount(page: Page, state: string): Promise<number> {
  const t = await page.getByTestId("state-counts").locator(`[data-state="${state}"]`).textContent();
  return Number((t ?? "").replace(/[^\d]/g, ""));
}
