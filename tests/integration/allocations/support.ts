// Shared helpers of the allocation tests: the ledger summed independently of lib/allocations/balance.ts,
// settled runs, and refusals.
import { expect } from "vitest";
import { AppError } from "@/lib/errors";
import { transitionRun } from "@/lib/runs/transition-run";
import { settleRun } from "@/lib/allocations/settle-run";
import { db } from "@/models";

/** Sum an allocation's entries in JS with the documented sign convention, and the lowest running `available` in id order. */
export async function ledgerSums(allocationId: string) {
  const rows = await db().LedgerEntry.findAll({ where: { allocationId }, order: [["id", "ASC"]] });
  const u = (x: number) => Math.round(x * 1e4); // integer units of the numeric(16,4) column
  let available = 0;
  let charged = 0;
  let reserved = 0;
  let released = 0;
  let lowest = 0;
  for (const e of rows) {
    if (e.kind === "grant" || e.kind === "adjust" || e.kind === "release") available += u(e.coreHours);
    if (e.kind === "reserve") { available -= u(e.coreHours); reserved += u(e.coreHours); }
    if (e.kind === "charge") charged += u(e.coreHours);
    if (e.kind === "release") released += u(e.coreHours);
    lowest = Math.min(lowest, available);
  }
  return { available: available / 1e4, charged: charged / 1e4, held: (reserved - released - charged) / 1e4, lowest: lowest / 1e4, count: rows.length };
}

/** Drive a run to an end with `coreHours` used and settle it. */
export async function finishRun(runId: string, coreHours: number, end: "done" | "failed" = "done") {
  await transitionRun(runId, "dispatched", { cause: "test" });
  await transitionRun(runId, "running", { cause: "test" });
  if (end === "done") {
    await transitionRun(runId, "collecting", { cause: "test", detail: { coreHours } });
    await transitionRun(runId, "done", { cause: "test" });
  } else {
    await transitionRun(runId, "failed", { cause: "test", detail: { coreHours }, patch: { failureReason: "nonzero_exit" } });
  }
  return settleRun(runId);
}

/** The AppError a promise rejects with. */
export async function refusal(p: Promise<unknown>): Promise<AppError> {
  const err = await p.then(() => null, (e: unknown) => e);
  expect(err).toBeInstanceOf(AppError);
  return err as AppError;
}
