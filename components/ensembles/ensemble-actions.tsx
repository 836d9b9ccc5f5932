"use client";
import { useState } from "react";
import { useQueryClient } from "@tanstack/react-query";
import { cancelEnsemble } from "@/app/(app)/ensembles/actions/cancel-ensemble";
import { resubmitFailed } from "@/app/(app)/ensembles/actions/resubmit-failed";
import { Button } from "@/components/ui/button";

type Kind = "cancel" | "resubmit";
type Outcome = { ok: boolean; text: string };

const QUESTION: Record<Kind, (n: number) => string> = {
  cancel: (n) => `Cancel ${n} unfinished run${n === 1 ? "" : "s"}? Their unused core-hours are released.`,
  resubmit: (n) => `Queue ${n} failed run${n === 1 ? "" : "s"} again, with the same seeds? Core-hours are reserved for them again.`,
};

const runs = (n: number) => `${n} run${n === 1 ? "" : "s"}`;

/** What an action's lib call answered, in words (lib/ensembles cancel-ensemble / resubmit-failed results). */
function said(kind: Kind, data: unknown): string {
  const d = (data ?? {}) as { cancelled?: number; onCluster?: number; runIds?: string[] };
  if (kind === "resubmit") return `Queued ${runs(d.runIds?.length ?? 0)} again.`;
  const now = d.cancelled ?? 0;
  const later = d.onCluster ?? 0;
  if (later === 0) return `Cancelled ${runs(now)}.`;
  return `Cancelled ${runs(now + later)}: ${now} at once, ${later} being stopped on the cluster.`;
}

/** Cancel and resubmit-failed, each behind a confirmation, with the outcome shown in place. */
export function EnsembleActions({ id, unfinished, failed }: { id: string; unfinished: number; failed: number }) {
  const qc = useQueryClient();
  const [asking, setAsking] = useState<Kind | null>(null);
  const [busy, setBusy] = useState(false);
  const [outcome, setOutcome] = useState<Outcome | null>(null);
  async function go(kind: Kind) {
    setBusy(true);
    const r = kind === "cancel" ? await cancelEnsemble({ id }) : await resubmitFailed({ id });
    setBusy(false);
    setAsking(null);
    setOutcome("data" in r ? { ok: true, text: said(kind, r.data) } : { ok: false, text: `${kind === "cancel" ? "Not cancelled" : "Not resubmitted"}: ${r.error.message}` });
    await qc.invalidateQueries({ queryKey: ["ensemble", id] });
  }
  return (
    <div className="space-y-2" data-testid="ensemble-actions">
      <div className="flex gap-2">
        <Button variant="danger" disabled={busy || unfinished === 0} onClick={() => { setOutcome(null); setAsking("cancel"); }}>Cancel ensemble…</Button>
        <Button variant="quiet" disabled={busy || failed === 0} onClick={() => { setOutcome(null); setAsking("resubmit"); }}>Resubmit failed ({failed})…</Button>
      </div>
      {asking ? (
        <div role="alertdialog" aria-label="Confirm" className="rounded-md border border-line-strong bg-paper-sunken p-3 text-sm max-w-md">
          <p>{QUESTION[asking](asking === "cancel" ? unfinished : failed)}</p>
          <div className="mt-2 flex gap-2">
            <Button variant={asking === "cancel" ? "danger" : "primary"} disabled={busy} onClick={() => go(asking)}>{busy ? "Working…" : asking === "cancel" ? "Yes, cancel" : "Yes, resubmit"}</Button>
            <Button variant="quiet" disabled={busy} onClick={() => setAsking(null)}>No</Button>
          </div>
        </div>
      ) : null}
      {outcome ? <p role="status" className={`text-sm ${outcome.ok ? "text-state-done" : "text-danger"}`}>{outcome.text}</p> : null}
    </div>
  );
}
