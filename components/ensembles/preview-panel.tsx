"use client";
import { coreHoursFine as coreHours } from "./core-hours";
import type { PreviewState } from "@/lib/hooks/use-spec-preview";
import type { SubmissionPreview } from "@/lib/ensembles/preview-submission";

// Names of the admission limits (lib/ensembles/funds.ts) as the refusal headline says them.
const LIMIT_LABEL: Record<string, string> = {
  suspended: "a suspended allocation", closed: "a closed allocation", cluster: "the allocation's cluster",
  allocation_balance: "the allocation's balance", person_cap: "your per-person cap", ensemble_ceiling: "the per-ensemble ceiling",
};

/** What previewSubmission answers. */
export type SpecPreview = SubmissionPreview;

/** The preview before submit: points, runs, sample seeds, and the core-hours against the balance. */
export function PreviewPanel({ state }: { state: PreviewState<SpecPreview> }) {
  const shown = state.status === "checking" ? state.last : state;
  return (
    <section aria-label="Preview" data-testid="preview" className="rounded-lg border border-line bg-paper-raised p-4 text-sm">
      <h2 className="text-xs font-medium uppercase tracking-wide text-ink-soft mb-3 flex justify-between">
        Preview <span className="normal-case tracking-normal text-ink-faint" aria-live="polite">{state.status === "checking" ? "checking…" : ""}</span>
      </h2>
      {!shown || shown.status === "idle" || shown.status === "checking" ? <p className="text-ink-soft">Fill in the spec; it is checked as you type.</p> : null}
      {shown?.status === "error" ? (
        <div role="alert" data-testid="preview-problems">
          <p className="font-medium text-danger">{shown.code === "invalid" ? "The spec needs changes before it can run:" : shown.message}</p>
          {shown.issues.length ? (
            <ul className="mt-2 space-y-1">
              {shown.issues.map((i, k) => <li key={k}><span className="mono text-xs text-ink-soft">{i.path}</span> {i.message}</li>)}
            </ul>
          ) : shown.code === "invalid" ? <p className="mt-1">{shown.message}</p> : null}
        </div>
      ) : null}
      {shown?.status === "ok" ? <PreviewFigures p={shown.data} /> : null}
    </section>
  );
}

function PreviewFigures({ p }: { p: SpecPreview }) {
  const after = p.allocation ? p.allocation.available - p.coreHoursNeeded : null;
  return (
    <div className="space-y-3">
      <dl className="grid grid-cols-2 gap-y-1">
        <dt className="text-ink-soft">Points</dt><dd className="num text-right font-medium" data-testid="preview-points">{p.points.toLocaleString("en-GB")}</dd>
        <dt className="text-ink-soft">Runs</dt><dd className="num text-right font-medium" data-testid="preview-runs">{p.runs.toLocaleString("en-GB")}</dd>
        <dt className="text-ink-soft">To reserve</dt><dd className="num text-right font-medium" data-testid="preview-core-hours">{coreHours(p.coreHoursNeeded)} core-h</dd>
        {p.allocation ? <><dt className="text-ink-soft">Available on {p.allocation.name}</dt><dd className="num text-right">{coreHours(p.allocation.available)} core-h</dd></> : null}
        {after !== null ? <><dt className="text-ink-soft">Left after</dt><dd className={`num text-right ${after < 0 ? "text-danger font-medium" : ""}`}>{coreHours(after)} core-h</dd></> : null}
        {p.cap ? <><dt className="text-ink-soft">Your cap left</dt><dd className="num text-right">{coreHours(p.cap.remaining)} of {coreHours(p.cap.limit)}</dd></> : null}
      </dl>
      {p.seeds.length ? (
        <div>
          <h3 className="text-xs text-ink-soft mb-1">Seeds (first {p.seeds.length} of {p.runs.toLocaleString("en-GB")})</h3>
          <table className="w-full text-xs" data-testid="preview-seeds">
            <thead><tr className="text-ink-faint"><th className="text-left font-normal">point</th><th className="text-left font-normal">replica</th><th className="text-left font-normal">seed</th></tr></thead>
            <tbody>{p.seeds.map((s) => <tr key={`${s.pointIndex}-${s.replica}`}><td className="num">{s.pointIndex}</td><td className="num">{s.replica}</td><td className="mono">{s.seed}</td></tr>)}</tbody>
          </table>
        </div>
      ) : null}
      {p.warnings?.length ? <ul className="text-ink space-y-1 rounded bg-danger-soft/60 px-2 py-1" data-testid="preview-warnings">{p.warnings.map((w, k) => <li key={k}>⚠ {w}</li>)}</ul> : null}
      {p.problems.length ? (
        <ul role="alert" className="text-danger space-y-1" data-testid="preview-refusal">{p.explanation ? <li className="font-medium" data-testid="preview-limit">Refused by {LIMIT_LABEL[p.explanation.limit] ?? p.explanation.limit}: needs {coreHours(p.explanation.needed)} core-h, {coreHours(p.explanation.free)} core-h free</li> : null}{p.problems.map((x, k) => <li key={k}>{x.path ? <span className="mono text-xs text-ink-soft">{x.path} </span> : null}{x.message}</li>)}</ul>
      ) : <p className="text-state-done" data-testid="preview-ok">● Ready to submit.</p>}
    </div>
  );
}
