"use client";
import { useEnsemble, isLive, type EnsembleDetail } from "@/lib/hooks/use-ensemble";
import { coreHoursFine as coreHours } from "./core-hours";
import { Card } from "@/components/ui/card";
import { StateBadge } from "@/components/ui/state-badge";
import { Time } from "@/components/ui/time";
import { ProgressBar } from "@/components/ui/progress-bar";
import { CollapsibleJson } from "@/components/ui/collapsible-json";
import { RunGrid } from "./run-grid";
import { EnsembleActions } from "./ensemble-actions";

const plural = (n: number, w: string) => `${n.toLocaleString("en-GB")} ${w}${n === 1 ? "" : "s"}`;
const RUN_STATES = ["queued", "dispatched", "running", "collecting", "done", "failed", "cancelled"];
const CANCELLABLE = ["queued", "dispatched", "running"]; // collecting runs have finished computing

/** An ensemble's live page body: header facts, counts, core-hours, the run grid, actions and spec. */
export function EnsembleView({ initial, canAct }: { initial: EnsembleDetail; canAct: boolean }) {
  const { data: e, error, dataUpdatedAt } = useEnsemble(initial.id, initial);
  const live = isLive(e);
  const total = e.counts.total;
  // a done run counts whole even if its last progress report said 99 %
  const overall = total ? e.points.reduce((n, p) => n + p.runs.reduce((m, r) => m + (r.state === "done" ? 1 : r.progress ?? 0), 0), 0) / total : 0;
  const unfinished = CANCELLABLE.reduce((n, s) => n + (e.counts[s] ?? 0), 0);
  return (
    <div className="space-y-4">
      <div className="flex flex-wrap items-center gap-x-6 gap-y-2 text-sm" data-testid="ensemble-facts">
        <span data-testid="ensemble-state"><StateBadge state={e.state} /></span>
        <span><span className="text-ink-soft">owner</span> {e.owner?.name}</span>
        <span><span className="text-ink-soft">sampler</span> {e.sampler?.name} <span className="text-ink-faint">{e.sampler?.version}</span></span>
        {e.cluster ? <span><span className="text-ink-soft">cluster</span> {e.cluster.name}</span> : null}
        <span><span className="text-ink-soft">submitted</span> <Time at={e.createdAt} /></span>
        {e.tags.length ? <span className="flex gap-1">{e.tags.map((t) => <span key={t} className="rounded bg-paper-sunken px-1.5 text-xs">{t}</span>)}</span> : null}
        <span className="basis-full text-xs"><span className="text-ink-soft">spec hash</span> <span className="mono break-all" data-testid="spec-hash">{e.specHash}</span></span>
      </div>

      <div className="grid gap-4 md:grid-cols-3">
        <Card title="Progress" className="md:col-span-2">
          <div className="flex items-center gap-3">
            <ProgressBar value={overall} label="ensemble progress" tone="bg-state-done" className="flex-1 h-2" />
            <span className="num text-sm font-medium w-14 text-right" data-testid="ensemble-progress">{Math.round(overall * 100)} %</span>
          </div>
          <ul className="flex flex-wrap gap-x-5 gap-y-1 mt-3" data-testid="state-counts">
            {RUN_STATES.map((s) => (
              <li key={s} className={`flex items-center gap-1.5 text-sm ${(e.counts[s] ?? 0) === 0 ? "opacity-50" : ""}`}>
                <StateBadge state={s} /><span className="num font-medium" data-state={s}>{(e.counts[s] ?? 0).toLocaleString("en-GB")}</span>
              </li>
            ))}
          </ul>
          <p className="text-xxs text-ink-faint mt-2" aria-live="polite">
            {live ? <>updating every 2 s · last <Time at={new Date(dataUpdatedAt || Date.now()).toISOString()} /></> : "all runs have ended"}
            {error ? <span className="text-danger"> · could not refresh: {error.message}</span> : null}
          </p>
        </Card>
        <Card title="Core-hours">
          <dl className="grid grid-cols-2 gap-y-1 text-sm" data-testid="core-hours">
            <dt className="text-ink-soft">Reserved</dt><dd className="num text-right font-medium" data-testid="reserved">{coreHours(e.coreHours.reserved)}</dd>
            <dt className="text-ink-soft">Charged</dt><dd className="num text-right font-medium" data-testid="charged">{coreHours(e.coreHours.charged)}</dd>
            <dt className="text-ink-soft">Released</dt><dd className="num text-right">{coreHours(e.coreHours.released)}</dd>
            <dt className="text-ink-soft">Still held</dt><dd className="num text-right" data-testid="held">{coreHours(e.coreHours.held)}</dd>
          </dl>
          {e.allocation ? <p className="text-xxs text-ink-faint mt-2">on {e.allocation.name}</p> : null}
        </Card>
      </div>

      <Card title={`Runs · ${plural(e.points.length, "point")} × ${plural(e.replicas, "replica")}`}>
        <RunGrid points={e.points} />
        <p className="text-xxs text-ink-faint mt-2">Hover a run for its id and progress; open it for its events, output and estimates.</p>
      </Card>

      <div className="flex flex-wrap items-start justify-between gap-4">
        {canAct ? <EnsembleActions id={e.id} unfinished={unfinished} failed={e.counts.failed ?? 0} /> : <span />}
        <span className="flex flex-wrap gap-x-6 text-sm">
          <a href={`/provenance/ensembles/${e.id}`} className="text-accent hover:underline" data-testid="ensemble-provenance-link">Provenance →</a>
          <a href={`/api/v1/ensembles/${e.id}/estimates?format=csv`} className="text-accent hover:underline" data-testid="estimates-csv">Download estimates (CSV)</a>
        </span>
      </div>

      <CollapsibleJson summary="Spec as submitted" value={e.spec} testId="spec" />
    </div>
  );
}
