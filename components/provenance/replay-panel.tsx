"use client";
// Replay a run: queue it, poll until the broker has compared the replayed series with the archive, then say
// "identical" or exactly what differs (file, byte, row and sweep; sampler builds of both sides).
import { useEffect, useState } from "react";
import { Button } from "@/components/ui/button";
import { Time } from "@/components/ui/time";
import type { ReplayStatus } from "@/lib/provenance/replay/replay-run";

const POLL_MS = 1000;
const open = (r: ReplayStatus | undefined) => !!r && (r.state === "queued" || r.state === "running");

/** The replay button (when `may`) and the run's replays, newest first. */
export function ReplayPanel({ runId, may, initial }: { runId: string; may: boolean; initial: ReplayStatus[] }) {
  const [replays, setReplays] = useState(initial);
  const [error, setError] = useState<string | null>(null);
  const latest = replays[0];
  const running = open(latest);
  useEffect(() => {
    if (!running) return;
    const t = setTimeout(async () => {
      const res = await fetch(`/api/v1/runs/${runId}/replay`, { headers: { accept: "application/json" } }).catch(() => null);
      if (!res?.ok) { setError(`could not read the replay's state (${res ? res.status : "network error"}); it keeps running, reload to see it`); return; }
      setReplays((await res.json()).data);
    }, POLL_MS);
    return () => clearTimeout(t);
  }, [runId, running, replays]);
  async function start() {
    setError(null);
    const res = await fetch(`/api/v1/runs/${runId}/replay`, { method: "POST", headers: { accept: "application/json" } }).catch(() => null);
    const body = res ? await res.json().catch(() => null) : null;
    if (!res?.ok) { setError(body?.error?.message ?? `the replay could not be queued (${res ? res.status : "network error"})`); return; }
    setReplays((rs) => [body.data, ...rs.filter((r) => r.id !== body.data.id)]);
  }
  return (
    <div className="space-y-2 text-sm" data-testid="replay-panel">
      <div className="flex flex-wrap items-center gap-3">
        {may ? <Button variant="quiet" onClick={start} disabled={running} data-testid="replay-button">{running ? "Replaying…" : "Replay this run"}</Button> : null}
        <span className="text-ink-soft">Run the same run.json again on its cluster and compare every result file byte for byte with the archive. Not charged to the allocation.</span>
      </div>
      {error ? <p role="alert" className="text-danger">{error}</p> : null}
      {running ? <p aria-live="polite" className="text-ink-soft" data-testid="replay-progress">{latest.state === "queued" ? "Queued: waiting for the broker…" : "Running on the cluster; the comparison follows when it ends…"}</p> : null}
      {replays.filter((r) => !open(r)).slice(0, 5).map((r) => <Outcome key={r.id} r={r} />)}
    </div>
  );
}

function Outcome({ r }: { r: ReplayStatus }) {
  const rep = r.report;
  const mark = r.state === "identical" ? <span className="text-state-done">✓ identical</span> : r.state === "differs" ? <span className="text-danger">✗ differs</span> : <span className="text-danger">✗ failed</span>;
  return (
    <div className="rounded-md border border-line p-2" data-testid="replay-result" data-state={r.state}>
      <p><b>{mark}</b> <span className="text-ink-soft">— {r.finishedAt ? <Time at={r.finishedAt} /> : null}{r.requestedByName ? `, asked by ${r.requestedByName}` : ""}{rep ? `, ${rep.coreHours.toLocaleString("en-GB")} core-hours (not charged)` : ""}</span></p>
      {rep?.error ? <p className="text-danger">{rep.error}</p> : null}
      {rep && r.state === "identical" ? <p className="text-xs text-ink-soft">{rep.files.length} file(s) byte-identical; sampler <span className="mono">{rep.sampler.archived.name} {rep.sampler.archived.version}</span> <span className="mono break-all">{rep.sampler.archived.commit}</span>.</p> : null}
      {rep && rep.differences.length ? <ul className="ml-5 list-disc text-danger text-xs">{rep.differences.map((d, i) => <li key={i} className="break-all">{d}</li>)}</ul> : null}
      {rep && r.state === "differs" ? (
        <p className="text-xs text-ink-soft mt-1">archived build <span className="mono break-all">{rep.sampler.archived.version} {rep.sampler.archived.commit}</span>; replay build <span className="mono break-all">{rep.sampler.replay?.version} {rep.sampler.replay?.commit}</span></p>
      ) : null}
    </div>
  );
}
