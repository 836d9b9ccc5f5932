"use client";
import { useState } from "react";
import { Button } from "@/components/ui/button";
import { inputClass } from "@/components/ui/field";
import type { Draft } from "@/components/ensembles/spec-draft";
import { withPlanTag } from "@/lib/planner/plan-tag";
import { PlanFigures } from "./plan-figures";
import { OBSERVABLES, plannerBody, requestPlan, type PlanAnswer } from "./request-plan";

type Props = {
  draft: Draft;
  spec: Record<string, any>;
  update: (d: Partial<Draft>) => void;
  /** The preview's reservation for the form as it stands, to set the plan beside it. */
  reservation: number | null;
};

/**
 * The planner in the submit form: a target error on one observable → measurements, sweeps and
 * core-hours from earlier estimates, with what they rest on; "Use" fills the form from it and tags
 * the spec with the prediction so that the outcome is recorded when the ensemble ends.
 */
export function PlannerPanel({ draft, spec, update, reservation }: Props) {
  const sampler: string = spec.sampler?.name ?? "";
  const choices = OBSERVABLES[sampler] ?? [];
  const [observable, setObservable] = useState(choices[0] ?? "");
  const [targetError, setTargetError] = useState("");
  const [pilot, setPilot] = useState("");
  const [answer, setAnswer] = useState<PlanAnswer | null>(null);
  const [askedFor, setAskedFor] = useState("");
  const [busy, setBusy] = useState(false);
  const body = plannerBody(spec, { observable, targetError, pilot });
  const key = JSON.stringify(body);
  const stale = answer !== null && "data" in answer && askedFor !== key && !usedBy(answer, draft);

  async function predict() {
    setBusy(true);
    setAskedFor(key);
    setAnswer(await requestPlan(body));
    setBusy(false);
  }

  function use() {
    if (!answer || !("data" in answer)) return;
    const p = answer.data;
    const tags = withPlanTag(draft.tags.split(/[,\s]+/).map((t) => t.trim()).filter(Boolean), p.id);
    update({
      measurements: String(p.measurements), thermalization: String(p.request.thermalization),
      ...(p.wallMinutes !== null ? { wallMinutes: String(p.wallMinutes) } : {}), tags: tags.join(", "),
    });
    // the fill changes the form; the prediction still describes it
    setAskedFor(JSON.stringify(plannerBody({ ...spec, measurements: p.measurements, thermalization: p.request.thermalization }, { observable, targetError, pilot })));
  }

  return (
    <section aria-label="Planner" data-testid="planner" className="rounded-lg border border-line bg-paper-raised p-4 text-sm space-y-3">
      <h2 className="text-xs font-medium uppercase tracking-wide text-ink-soft">Planner</h2>
      <p className="text-xs text-ink-faint">How long to run for a target error, from the estimates of earlier runs near these parameters.</p>
      <div className="grid grid-cols-2 gap-2">
        <label className="block text-xs">
          <span className="block text-ink-soft mb-1">Observable</span>
          <input aria-label="Planner observable" list="planner-observables" value={observable} onChange={(e) => setObservable(e.target.value)} className={`${inputClass} mono`} />
          <datalist id="planner-observables">{choices.map((o) => <option key={o} value={o} />)}</datalist>
        </label>
        <label className="block text-xs">
          <span className="block text-ink-soft mb-1">Target error</span>
          <input aria-label="Target error" value={targetError} onChange={(e) => setTargetError(e.target.value)} inputMode="decimal" placeholder="e.g. 0.001" className={`${inputClass} num`} />
        </label>
      </div>
      <label className="block text-xs">
        <span className="block text-ink-soft mb-1">Pilot ensemble id (optional)</span>
        <input aria-label="Pilot ensemble" value={pilot} onChange={(e) => setPilot(e.target.value)} placeholder="all earlier runs of your groups" className={`${inputClass} mono text-xs`} />
      </label>
      <Button type="button" variant="quiet" onClick={predict} disabled={busy || !observable || !targetError} className="w-full justify-center">
        {busy ? "Predicting…" : "Predict"}
      </Button>
      {answer && "error" in answer ? (
        <div role="alert" className="text-danger text-xs" data-testid="planner-error">
          <p>{answer.error.message}</p>
          {answer.error.issues?.length ? <ul className="mt-1">{answer.error.issues.map((i, k) => <li key={k}><span className="mono text-ink-soft">{i.path}</span> {i.message}</li>)}</ul> : null}
        </div>
      ) : null}
      {answer && "data" in answer ? (
        <>
          {stale ? <p className="text-xs text-ink-soft" role="status">The form changed since this prediction: predict again.</p> : null}
          <PlanFigures plan={answer.data} reservation={reservation} />
          <Button type="button" onClick={use} disabled={stale || usedBy(answer, draft)} className="w-full justify-center" data-testid="planner-use">
            {usedBy(answer, draft) ? "Form follows this plan" : "Use: fill measurements and wall time"}
          </Button>
        </>
      ) : null}
    </section>
  );
}

/** True when the form already carries the plan's figures and tag. */
function usedBy(answer: PlanAnswer, draft: Draft): boolean {
  if (!("data" in answer)) return false;
  const p = answer.data;
  return draft.measurements === String(p.measurements) && draft.tags.includes(p.tag);
}
