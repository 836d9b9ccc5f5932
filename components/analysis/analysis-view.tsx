"use client";
import { useEffect, useState } from "react";
import { useRunAnalysis, useSaveEstimate, type AnalysisChoice } from "@/lib/hooks/use-run-analysis";
import { concise, formatPlain } from "@/lib/format";
import { Card } from "@/components/ui/card";
import { Button } from "@/components/ui/button";
import { AnalysisControls } from "./analysis-controls";
import { SeriesChart } from "./series-chart";
import { AcfChart } from "./acf-chart";
import { BlockingChart } from "./blocking-chart";
import { EstimateVersions } from "./estimate-versions";

type Rule = "wolff" | "madras-sokal";

/** A run's re-analysis: move the cut or change the window rule, see the estimate live, save it as a new version. */
export function AnalysisView({ runId, observables, people, canSave }: { runId: string; observables: string[]; people: Record<string, string>; canSave: boolean }) {
  const [observable, setObservable] = useState(observables[0] ?? "");
  const [cut, setCut] = useState<number | null>(null); // null: the automatic (MSER-5) cut
  const [rule, setRule] = useState<Rule>("wolff");
  // the slider moves freely; the server is asked once the hand rests for a moment
  const [asked, setAsked] = useState<AnalysisChoice>({ observable, window: rule });
  useEffect(() => {
    const t = setTimeout(() => setAsked({ observable, cut, window: rule }), 250);
    return () => clearTimeout(t);
  }, [observable, cut, rule]);
  const { data: a, error, isFetching } = useRunAnalysis(runId, asked);
  const save = useSaveEstimate(runId);
  const shownCut = cut ?? a?.cut.index ?? 0;
  // the analysis needs points after the cut; half the series is a generous upper end for a manual cut
  const maxCut = a ? Math.max(0, a.series.total - 50) : 0;

  if (observables.length === 0) return <p className="text-sm text-ink-soft">This run has no imported series yet, so there is nothing to analyse. Its series arrive when the run is collected.</p>;
  return (
    <div className="space-y-4">
      <Card>
        <AnalysisControls observables={observables} observable={observable} cut={shownCut} maxCut={maxCut} rule={rule}
          onChange={(c) => {
            if (c.observable !== undefined) { setObservable(c.observable); setCut(null); save.reset(); }
            if (c.cut !== undefined) setCut(c.cut);
            if (c.window !== undefined) setRule(c.window);
          }} />
        {error ? <p role="alert" className="text-sm text-danger mt-3">Could not analyse: {error.message}. Choose a smaller cut or another observable.</p> : null}
        {a ? (
          <div className="mt-4 flex flex-wrap items-center gap-x-8 gap-y-2">
            <div>
              <div className="text-xs text-ink-soft">estimate of <span className="mono">{a.observable}</span> with these choices</div>
              <div className="text-2xl font-semibold num" data-testid="live-estimate" title={`mean ${a.estimate.mean} ± ${a.estimate.error}`}>{concise(a.estimate.mean, a.estimate.error)}</div>
            </div>
            <Fact label="τ_int" testId="live-tau">{concise(a.estimate.tauInt, a.estimate.tauIntError)}</Fact>
            <Fact label="window W" testId="live-window">{a.acf.window} <span className="text-ink-faint text-xs">({a.acf.method})</span></Fact>
            <Fact label="points after cut">{a.estimate.n.toLocaleString("en-GB")}</Fact>
            <Fact label="cut" testId="live-cut">{a.cut.index.toLocaleString("en-GB")} <span className="text-ink-faint text-xs">({a.cut.rule})</span></Fact>
            <span className="text-xs text-ink-faint" aria-live="polite">{isFetching ? "recomputing…" : ""}</span>
            <div className="ml-auto flex items-center gap-2">
              {cut !== null ? <Button variant="quiet" onClick={() => setCut(null)}>Automatic cut</Button> : null}
              {canSave ? <Button onClick={() => save.mutate({ observable, cut: cut ?? undefined, window: rule })} disabled={save.isPending || isFetching}>
                {save.isPending ? "Saving…" : "Save as new version"}
              </Button> : <span className="text-xs text-ink-faint">Viewers may try choices; saving needs a researcher.</span>}
            </div>
          </div>
        ) : <p className="text-sm text-ink-soft mt-3">Computing the analysis…</p>}
        {save.error ? <p role="alert" className="text-sm text-danger mt-2">Not saved: {save.error.message}</p> : null}
        {save.isSuccess ? <p className="text-sm text-accent-strong mt-2" data-testid="saved">Saved as version v{save.data?.estimate.version}{save.data?.previousVersion ? ` (v${save.data.previousVersion} kept)` : ""}; the point estimates of its ensemble were recomputed.</p> : null}
        {a?.estimate.warnings.length ? <ul className="mt-2 text-xs text-danger list-disc pl-5">{a.estimate.warnings.map((w) => <li key={w}>{w}</li>)}</ul> : null}
      </Card>
      {a ? (
        <>
          <Card title="Series and thermalisation cut"><SeriesChart a={a} /></Card>
          <div className="grid gap-4 lg:grid-cols-2">
            {/* τ_int stays out of the title: the uppercase title style would turn τ into a Latin-looking Τ */}
            <Card title="Normalised autocorrelation"><p className="text-xs text-ink-soft -mt-2 mb-1">τ<sub>int</sub> = <span className="num">{formatPlain(a.estimate.tauInt, 4)}</span> at window W = <span className="num">{a.acf.window}</span></p><AcfChart a={a} /></Card>
            <Card title="Blocking curve"><BlockingChart a={a} /></Card>
          </div>
          <Card title="Stored versions"><EstimateVersions versions={a.versions} people={people} /></Card>
        </>
      ) : null}
    </div>
  );
}

function Fact({ label, children, testId }: { label: string; children: React.ReactNode; testId?: string }) {
  return <div><div className="text-xs text-ink-soft">{label}</div><div className="num" data-testid={testId}>{children}</div></div>;
}
