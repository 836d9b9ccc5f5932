"use client";
// Freeze (after a confirmation that says what it locks), unfreeze (a PI, with a required reason), download the bundle.
import { useRouter } from "next/navigation";
import { useState } from "react";
import { freezeManuscript } from "@/app/(app)/manuscripts/actions/freeze-manuscript";
import { unfreezeManuscript } from "@/app/(app)/manuscripts/actions/unfreeze-manuscript";
import { Button } from "@/components/ui/button";
import { inputClass } from "@/components/ui/field";

/** The controls of one manuscript; `may` says which the caller may use (the server checks again). */
export function ManuscriptControls({ id, may, exhibits, estimates }: { id: string; may: { freeze: boolean; unfreeze: boolean }; exhibits: number; estimates: number }) {
  const router = useRouter();
  const [error, setError] = useState<string | null>(null);
  const [confirming, setConfirming] = useState<"freeze" | "unfreeze" | null>(null);
  const [reason, setReason] = useState("");
  const [busy, setBusy] = useState(false);
  const act = async (f: () => Promise<{ data: unknown } | { error: { message: string } }>) => {
    setError(null); setBusy(true);
    const r = await f();
    setBusy(false);
    if ("error" in r) setError(r.error.message); else { setConfirming(null); setReason(""); router.refresh(); }
  };
  return (
    <div className="space-y-3">
      <div className="flex flex-wrap items-center gap-2">
        {may.freeze && confirming !== "freeze" ? <Button onClick={() => setConfirming("freeze")} disabled={exhibits === 0} title={exhibits === 0 ? "add an exhibit first" : undefined}>Freeze…</Button> : null}
        {may.unfreeze && confirming !== "unfreeze" ? <Button variant="danger" onClick={() => setConfirming("unfreeze")}>Unfreeze…</Button> : null}
        <a className="rounded-md border border-line-strong bg-paper-raised px-3 py-1.5 text-sm font-medium hover:bg-paper-sunken" href={`/api/v1/manuscripts/${id}/bundle`} download>Download bundle (.zip)</a>
      </div>
      {confirming === "freeze" ? (
        <div role="dialog" aria-label="Confirm freeze" className="max-w-2xl rounded-lg border border-accent bg-accent-soft p-4 text-sm">
          <p className="font-medium">Freeze this manuscript?</p>
          <p className="mt-1">Each of its {exhibits} exhibit{exhibits === 1 ? "" : "s"} is snapshotted ({estimates.toLocaleString("en-GB")} estimate{estimates === 1 ? "" : "s"} as they stand now, with the sha256 of every archived file beneath them).
            From then on the database refuses any change to those estimates, their runs and files; re-analysis adds new versions beside them. Only a PI of the group can unfreeze, with a reason that is recorded.</p>
          <div className="mt-3 flex gap-2">
            <Button onClick={() => act(() => freezeManuscript({ id }))} disabled={busy}>{busy ? "Freezing…" : "Freeze now"}</Button>
            <Button variant="quiet" onClick={() => setConfirming(null)} disabled={busy}>Cancel</Button>
          </div>
        </div>
      ) : null}
      {confirming === "unfreeze" ? (
        <form role="dialog" aria-label="Confirm unfreeze" className="max-w-2xl rounded-lg border border-danger bg-danger-soft p-4 text-sm"
          onSubmit={(e) => { e.preventDefault(); if (reason.trim()) void act(() => unfreezeManuscript({ id, reason: reason.trim() })); }}>
          <p className="font-medium">Unfreeze: the snapshots are released and the data beneath may change again.</p>
          <label className="mt-2 block">Why? <span className="text-ink-soft">(required; kept in the history and the audit log)</span>
            <textarea aria-label="Reason to unfreeze" required value={reason} onChange={(e) => setReason(e.target.value)} rows={2} className={`${inputClass} mt-1`} />
          </label>
          <div className="mt-3 flex gap-2">
            <Button type="submit" variant="danger" disabled={busy || !reason.trim()}>{busy ? "Unfreezing…" : "Unfreeze"}</Button>
            <Button type="button" variant="quiet" onClick={() => setConfirming(null)} disabled={busy}>Cancel</Button>
          </div>
        </form>
      ) : null}
      {error ? <p role="alert" className="text-sm text-danger">{error}</p> : null}
    </div>
  );
}
