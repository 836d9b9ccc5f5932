"use client";
// Verify a frozen manuscript: queue the job, poll its progress (a determinate bar: files and estimates checked of
// the total), then say per exhibit "verified" or exactly what differs.
import { useRouter } from "next/navigation";
import { useEffect, useState } from "react";
import { verifyManuscript } from "@/app/(app)/manuscripts/actions/verify-manuscript";
import { Button } from "@/components/ui/button";
import { ProgressBar } from "@/components/ui/progress-bar";
import { Time } from "@/components/ui/time";

type Report = { exhibits: { label: string; status: string; files: { path: string; runId: string; problem: string }[]; estimates: { observable: string; runId: string | null; field: string; recorded: unknown; recomputed: unknown }[] }[]; filesChecked: number; estimatesChecked: number };
/** A verification as GET …/verifications/:vid returns it. */
export type Verification = { id: string; state: string; itemsDone: number; itemsTotal: number; report: Report | null; createdAt?: string | Date; finishedAt?: string | Date | null };

const POLL_MS = 600;
const active = (v: Verification | null) => !!v && (v.state === "queued" || v.state === "running");

/** The verify button (when `may`), the live progress and the last report. */
export function VerifyPanel({ id, may, latest }: { id: string; may: boolean; latest: Verification | null }) {
  const router = useRouter();
  const [v, setV] = useState<Verification | null>(latest);
  const [error, setError] = useState<string | null>(null);
  const running = active(v);
  useEffect(() => {
    if (!running || !v) return;
    let stop = false;
    const t = setTimeout(async () => {
      const res = await fetch(`/api/v1/manuscripts/${id}/verifications/${v.id}`, { headers: { accept: "application/json" } }).catch(() => null);
      if (stop) return;
      if (!res?.ok) { setError(`could not read the verification's progress (${res ? res.status : "network error"}); it keeps running, reload to see it`); return; }
      const next = (await res.json()).data as Verification;
      setV(next);
      if (!active(next)) router.refresh();
    }, POLL_MS);
    return () => { stop = true; clearTimeout(t); };
  }, [id, running, v, router]);
  async function start() {
    setError(null);
    const r = await verifyManuscript({ id });
    if ("error" in r) setError(r.error.message);
    else setV({ id: r.data.verificationId, state: "queued", itemsDone: 0, itemsTotal: 0, report: null });
  }
  const share = v && v.itemsTotal ? v.itemsDone / v.itemsTotal : 0;
  return (
    <div className="space-y-2 text-sm" data-testid="verify-panel">
      <div className="flex flex-wrap items-center gap-3">
        {may ? <Button variant="quiet" onClick={start} disabled={running}>{running ? "Verifying…" : "Verify"}</Button> : null}
        <span className="text-ink-soft">{may ? "Re-hash every archived file and recompute every frozen estimate from its stored series." : v ? "Latest verification (re-hashed files, recomputed estimates):" : "Not verified yet."}</span>
      </div>
      {error ? <p role="alert" className="text-danger">{error}</p> : null}
      {v && running ? (
        <div aria-live="polite" data-testid="verify-progress" data-done={v.itemsDone} data-total={v.itemsTotal}>
          <ProgressBar value={share} label="verification progress" className="h-2 max-w-xl" />
          <p className="mt-1 tabular-nums text-ink-soft">{v.state === "queued" ? "Queued: waiting for the broker to start it…" : `Checked ${v.itemsDone.toLocaleString("en-GB")} of ${v.itemsTotal.toLocaleString("en-GB")} files and estimates (${Math.round(share * 100)} %)`}</p>
        </div>
      ) : null}
      {v && !running ? <Outcome v={v} /> : null}
    </div>
  );
}

function Outcome({ v }: { v: Verification }) {
  if (v.state === "failed") return <p className="text-danger" data-testid="verify-result">✗ The verification could not run to the end. Try again; if it fails again, tell an admin (the broker's log names the error).</p>;
  const r = v.report;
  if (!r) return null;
  return (
    <div aria-live="polite" data-testid="verify-result" data-state={v.state}>
      <ProgressBar value={1} label="verification progress" tone={v.state === "verified" ? "bg-state-done" : "bg-danger"} className="h-2 max-w-xl" />
      <p className="mt-1 font-medium">
        {v.state === "verified" ? "✓ Verified: every archived file and every estimate matches the snapshot." : "✗ Differs from the snapshot: see below."}
        <span className="ml-2 font-normal text-ink-soft tabular-nums">{r.filesChecked.toLocaleString("en-GB")} files and {r.estimatesChecked.toLocaleString("en-GB")} estimates checked{v.finishedAt ? <>, <Time at={v.finishedAt} /></> : null}.</span>
      </p>
      <ul className="mt-1 space-y-1">
        {r.exhibits.map((x) => (
          <li key={x.label} data-testid="verify-exhibit" data-label={x.label} data-status={x.status}>
            {x.status === "verified" ? <span className="text-state-done">✓</span> : <span className="text-danger">✗</span>} <b>{x.label}</b>: {x.status}
            {x.status !== "verified" ? (
              <ul className="ml-5 list-disc text-danger">
                {x.files.map((f) => <li key={`${f.runId}/${f.path}`}><span className="mono">{f.path}</span> of run <span className="mono">{f.runId.slice(0, 8)}</span>: {f.problem}</li>)}
                {x.estimates.map((e, i) => <li key={i}><span className="mono">{e.observable}</span>{e.runId ? <> of run <span className="mono">{e.runId.slice(0, 8)}</span></> : " (point)"}: {e.field} recorded {String(e.recorded)}, recomputed {String(e.recomputed)}</li>)}
              </ul>
            ) : null}
          </li>
        ))}
      </ul>
    </div>
  );
}
