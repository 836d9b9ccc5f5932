"use client";
// Coordinator controls of one allocation: top up, adjust with a reason, suspend / resume / close.
import { useState } from "react";
import { useRouter } from "next/navigation";
import { changeBalance } from "@/app/(app)/allocations/actions/change-balance";
import { setAllocationState } from "@/app/(app)/allocations/actions/set-allocation-state";
import { Button } from "@/components/ui/button";
import { inputClass } from "@/components/ui/field";
import type { AllocationState } from "@/lib/allocations/state";

type Result = { data: unknown } | { error: { message: string } };

/** Top-up / adjust and lifecycle forms; results are shown in one status line. */
export function ManagePanel({ id, state }: { id: string; state: AllocationState }) {
  const router = useRouter();
  const [status, setStatus] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const done = (res: Result, ok: string) => {
    setBusy(false);
    setStatus("error" in res ? `✕ ${res.error.message}` : `✓ ${ok}`);
    if (!("error" in res)) router.refresh();
  };
  async function hours(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const f = new FormData(e.currentTarget);
    const kind = String(f.get("kind")) as "top-up" | "adjust";
    const coreHours = Number(f.get("coreHours"));
    setBusy(true);
    done(await changeBalance({ id, change: { kind, coreHours, reason: String(f.get("reason") ?? "").trim() || (kind === "top-up" ? undefined : "") } as never }), kind === "top-up" ? `topped up by ${coreHours}` : `adjusted by ${coreHours}`);
  }
  async function lifecycle(next: AllocationState, form: HTMLFormElement) {
    const reason = String(new FormData(form).get("stateReason") ?? "").trim();
    if (next === "closed" && !confirm("Close this allocation for good? It takes no more submissions, hours or caps.")) return;
    setBusy(true);
    done(await setAllocationState({ id, change: { state: next, reason } }), `now ${next}`);
  }
  if (state === "closed") return <p className="text-sm text-ink-soft">Closed: no more hours, caps or submissions. Runs still in flight settle on it.</p>;
  return (
    <div className="space-y-4">
      <form onSubmit={hours} className="flex flex-wrap items-end gap-2" aria-label="Change hours">
        <label className="text-sm"><span className="block text-ink-soft mb-1">Change</span>
          <select name="kind" className={inputClass} aria-label="Change kind"><option value="top-up">Top up (+)</option><option value="adjust">Adjust (±, reason required)</option></select>
        </label>
        <label className="text-sm"><span className="block text-ink-soft mb-1">Core-hours</span><input name="coreHours" type="number" step="any" required className={`${inputClass} num w-32`} aria-label="Core-hours" /></label>
        <label className="text-sm grow"><span className="block text-ink-soft mb-1">Reason</span><input name="reason" className={inputClass} aria-label="Reason" placeholder="e.g. extra hours from the spring call" /></label>
        <Button type="submit" disabled={busy}>Record</Button>
      </form>
      <form onSubmit={(e) => e.preventDefault()} className="flex flex-wrap items-end gap-2" aria-label="Change state">
        <label className="text-sm grow"><span className="block text-ink-soft mb-1">Reason for a state change</span><input name="stateReason" className={inputClass} aria-label="State reason" placeholder="e.g. usage report overdue" /></label>
        {state === "active" ? <Button type="button" variant="quiet" disabled={busy} onClick={(e) => lifecycle("suspended", e.currentTarget.form!)}>Suspend</Button>
          : <Button type="button" variant="quiet" disabled={busy} onClick={(e) => lifecycle("active", e.currentTarget.form!)}>Resume</Button>}
        <Button type="button" variant="danger" disabled={busy} onClick={(e) => lifecycle("closed", e.currentTarget.form!)}>Close</Button>
      </form>
      {status ? <p role="status" className={`text-sm ${status.startsWith("✕") ? "text-danger" : "text-state-done"}`} data-testid="manage-status">{status}</p> : null}
    </div>
  );
}
