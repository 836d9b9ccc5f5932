"use client";
// Freeze, unfreeze (with a reason), verify with a progress bar that polls the verification, download the bundle.
import { useRouter } from "next/navigation";
import { useEffect, useState } from "react";
import { freezeManuscript } from "@/app/(app)/manuscripts/actions/freeze-manuscript";
import { unfreezeManuscript } from "@/app/(app)/manuscripts/actions/unfreeze-manuscript";
import { verifyManuscript } from "@/app/(app)/manuscripts/actions/verify-manuscript";
import { Button } from "@/components/ui/button";
import { inputClass } from "@/components/ui/field";
import { ProgressBar } from "@/components/ui/progress-bar";

type Verification = { id: string; state: string; itemsDone: number; itemsTotal: number; report: { exhibits: { label: string; status: string; files: { path: string; problem: string }[]; estimates: { observable: string; field: string; recorded: unknown; recomputed: unknown }[] }[] } | null };

/** The controls of one manuscript; `may` says which the caller may use. */
export function ManuscriptControls({ id, may, latest }: { id: string; may: { freeze: boolean; unfreeze: boolean; verify: boolean }; latest: Verification | null }) {
  const router = useRouter();
  const [error, setError] = useState<string | null>(null);
  const [reason, setReason] = useState("");
  const [v, setV] = useState<Verification | null>(latest);
  const running = v && (v.state === "queued" || v.state === "running");
  useEffect(() => {
    if (!running) return;
    const t = setInterval(async () => {
      const res = await fetch(`/api/v1/manuscripts/${id}/verifications/${v!.id}`);
      if (res.ok) setV((await res.json()).data);
    }, 700);
    return () => clearInterval(t);
  }, [id, running, v]);
  const act = async (f: () => Promise<{ data: unknown } | { error: { message: string } }>) => {
    setError(null);
    const r = await f();
    if ("error" in r) setError(r.error.message); else router.refresh();
    return r;
  };
  return (
    <div className="space-y-3">
      <div className="flex flex-wrap gap-2 items-center">
        {may.freeze ? <Button onClick={() => act(() => freezeManuscript({ id }))}>Freeze</Button> : null}
        {may.verify ? <Button variant="quiet" disabled={!!running} onClick={async () => {
          const r = await act(() => verifyManuscript({ id }));
          if ("data" in r) setV({ id: (r.data as { verificationId: string }).verificationId, state: "queued", itemsDone: 0, itemsTotal: 0, report: null });
        }}>Verify</Button> : null}
        <a className="text-sm text-accent hover:underline" href={`/api/v1/manuscripts/${id}/bundle`} download>Download bundle (.zip)</a>
        {may.unfreeze ? (
          <span className="flex gap-2 items-center">
            <input aria-label="Reason to unfreeze" placeholder="Reason to unfreeze" value={reason} onChange={(e) => setReason(e.target.value)} className={inputClass + " w-64"} />
            <Button variant="danger" disabled={!reason.trim()} onClick={() => act(() => unfreezeManuscript({ id, reason }))}>Unfreeze</Button>
          </span>
        ) : null}
      </div>
      {error ? <p role="alert" className="text-sm text-danger">{error}</p> : null}
      {v ? (
        <div aria-live="polite" className="text-sm">
          {running ? (<><ProgressBar value={v.itemsTotal ? v.itemsDone / v.itemsTotal : 0} label="verification progress" />
            <p className="mt-1 text-ink-soft tabular-nums">Verifying: {v.itemsDone} of {v.itemsTotal || "?"} files and estimates checked</p></>) : null}
          {v.state === "verified" ? <p className="font-medium">✓ verified: every archived file and every estimate matches the snapshot</p> : null}
          {v.state === "failed" ? <p className="text-danger">✗ verification failed to run; try again or tell an admin</p> : null}
          {v.state === "differs" && v.report ? (
            <ul className="text-danger space-y-1">
              {v.report.exhibits.map((x) => <li key={x.label}>{x.status === "verified" ? `✓ ${x.label}: verified` : `✗ ${x.label}: ${[...x.files.map((f) => `${f.path}: ${f.problem}`), ...x.estimates.map((e) => `${e.observable} ${e.field}: recorded ${String(e.recorded)}, recomputed ${String(e.recomputed)}`)].join("; ")}`}</li>)}
            </ul>
          ) : null}
        </div>
      ) : null}
    </div>
  );
}
