"use client";
import Link from "next/link";
import { useRun, type RunDetail } from "@/lib/hooks/use-run";
import { coreHoursFine as coreHours } from "@/components/ensembles/core-hours";
import { Card } from "@/components/ui/card";
import { StateBadge, STATE_BG } from "@/components/ui/state-badge";
import { ProgressBar } from "@/components/ui/progress-bar";
import { Time } from "@/components/ui/time";
import { EventsTimeline } from "./events-timeline";
import { EstimatesTable } from "./estimates-table";

const fmt = (v: unknown) => (typeof v === "number" ? String(Number(v.toPrecision(8))) : String(v));

function Fact({ label, children, testId }: { label: string; children: React.ReactNode; testId?: string }) {
  return <><dt className="text-ink-soft">{label}</dt><dd data-testid={testId} className="min-w-0 break-all">{children}</dd></>;
}

/** A run's live page body: facts, progress, failure output, events and estimates. */
export function RunView({ initial }: { initial: RunDetail }) {
  const { data: r } = useRun(initial.id, initial);
  const p = r.state === "done" ? 1 : r.progress ?? 0;
  return (
    <div className="space-y-4">
      <div className="flex flex-wrap items-center gap-x-6 gap-y-1 text-sm">
        <span data-testid="run-state"><StateBadge state={r.state} /></span>
        <span><span className="text-ink-soft">ensemble</span> <Link className="text-accent hover:underline" href={`/ensembles/${r.ensembleId}`}>{r.ensemble.name}</Link></span>
        <span><span className="text-ink-soft">point</span> <span className="num">#{r.point.pointIndex}</span> · <span className="text-ink-soft">replica</span> <span className="num">{r.replica}</span></span>
        <span><span className="text-ink-soft">attempt</span> <span className="num" data-testid="attempt">{r.attempt}</span></span>
      </div>
      <Card title="Progress">
        <div className="flex items-center gap-3">
          <ProgressBar value={p} label="run progress" tone={STATE_BG[r.state] ?? "bg-accent"} className="flex-1 h-2" />
          <span className="num text-sm font-medium w-14 text-right" data-testid="run-progress">{Math.round(p * 100)} %</span>
        </div>
        <p className="text-xs text-ink-soft num mt-1">{r.sweepsDone.toLocaleString("en-GB")}{r.sweepsTotal ? ` of ${r.sweepsTotal.toLocaleString("en-GB")}` : ""} sweeps</p>
      </Card>
      {r.failureReason || r.stderrTail ? (
        <Card title="Failure" className="border-danger">
          {r.failureReason ? <p className="text-sm"><span className="mono text-danger">{r.failureReason}</span>{r.failureDetail ? <> — {r.failureDetail}</> : null}</p> : null}
          {r.stderrTail ? <pre className="mono text-xs bg-paper-sunken rounded p-2 mt-2 overflow-x-auto max-h-64 whitespace-pre-wrap" data-testid="stderr">{r.stderrTail}</pre> : null}
        </Card>
      ) : null}
      <div className="grid gap-4 md:grid-cols-2">
        <Card title="Parameters">
          <dl className="grid grid-cols-[8rem_1fr] gap-y-1 text-sm" data-testid="params">
            {Object.entries(r.point.params).map(([k, v]) => <Fact key={k} label={k}><span className="num">{fmt(v)}</span></Fact>)}
            <Fact label="seed" testId="seed"><span className="mono">{r.seed}</span></Fact>
          </dl>
        </Card>
        <Card title="On the cluster">
          <dl className="grid grid-cols-[8rem_1fr] gap-y-1 text-sm" data-testid="cluster-facts">
            <Fact label="scheduler job"><span className="mono">{r.schedulerJobId ?? "—"}</span></Fact>
            <Fact label="work dir"><span className="mono">{r.workDir ?? "—"}</span></Fact>
            <Fact label="host"><span className="mono">{r.host ?? "—"}</span></Fact>
            <Fact label="exit code" testId="exit-code"><span className="mono">{r.exitCode ?? "—"}</span></Fact>
            <Fact label="cores"><span className="num">{r.cores}</span></Fact>
            <Fact label="core-hours"><span className="num">{r.coreHoursUsed === null ? "—" : coreHours(r.coreHoursUsed)} used of {coreHours(r.reservedCoreHours)} reserved</span></Fact>
            <Fact label="started">{r.startedAt ? <Time at={r.startedAt} /> : "—"}</Fact>
            <Fact label="finished">{r.finishedAt ? <Time at={r.finishedAt} /> : "—"}</Fact>
            {r.samplerCommit ? <Fact label="sampler commit"><span className="mono text-xs">{r.samplerCommit}</span></Fact> : null}
          </dl>
        </Card>
      </div>
      <Card title="Estimates">
        <EstimatesTable estimates={r.estimates} state={r.state} />
        <div className="mt-3 flex flex-wrap gap-x-6 gap-y-1 text-sm">
          {r.estimates.length ? <Link href={`/runs/${r.id}/analysis`} className="text-accent hover:underline">Analyse this run: thermalisation cut, autocorrelation, blocking →</Link> : null}
          <Link href={`/provenance/runs/${r.id}`} className="text-accent hover:underline" data-testid="run-provenance-link">Provenance and replay →</Link>
        </div>
      </Card>
      <Card title="Events"><EventsTimeline events={r.events} /></Card>
    </div>
  );
}
