"use client";
import { useCallback, useMemo, useState } from "react";
import { useRouter } from "next/navigation";
import { previewEnsemble } from "@/app/(app)/ensembles/actions/preview-ensemble";
import { submitEnsemble } from "@/app/(app)/ensembles/actions/submit-ensemble";
import { useSpecPreview } from "@/lib/hooks/use-spec-preview";
import { Field, inputClass } from "@/components/ui/field";
import { Button } from "@/components/ui/button";
import { blankDraft, draftToSpec, issuesAt, samplerKey, specToDraft, type Draft, type SamplerOption } from "./spec-draft";
import { SamplerFields } from "./sampler-fields";
import { RunFields } from "./run-fields";
import { SpecFileInput } from "./spec-file-input";
import { PreviewPanel, type SpecPreview } from "./preview-panel";
import { PlannerPanel } from "@/components/planner/planner-panel";

type Mode = "form" | "file";

/** The new-ensemble form: fields or a spec file, checked live, previewed, then submitted. */
export function NewEnsembleForm({ samplers, example, seed }: { samplers: SamplerOption[]; example: Record<string, unknown> | null; seed: string }) {
  const router = useRouter();
  const [mode, setMode] = useState<Mode>("form");
  const [draft, setDraft] = useState<Draft>(() => (example ? specToDraft(example, seed) : blankDraft(samplers.find((s) => s.name === "ising2d") ?? samplers[0], seed)));
  const [text, setText] = useState("");
  const [submitting, setSubmitting] = useState(false);
  const [refusal, setRefusal] = useState<string | null>(null);
  const spec = useMemo(() => draftToSpec(draft, samplers), [draft, samplers]);
  const input = mode === "form" ? spec : text;
  const preview = useSpecPreview<SpecPreview>(input, previewEnsemble as never);
  const issues = preview.status === "error" ? preview.issues
    : preview.status === "ok" ? preview.data.problems.filter((x) => x.path).map((x) => ({ path: x.path!, message: x.message })) : [];
  const update = useCallback((d: Partial<Draft>) => { setRefusal(null); setDraft((x) => ({ ...x, ...d })); }, []);
  const sampler = samplers.find((s) => samplerKey(s) === draft.sampler);

  function switchMode(next: Mode) {
    if (next === "file" && text.trim() === "") setText(JSON.stringify(spec, null, 2));
    if (next === "form" && text.trim().startsWith("{")) {
      try { setDraft(specToDraft(JSON.parse(text), seed)); } catch { /* not JSON: the form keeps its own state */ }
    }
    setMode(next);
  }

  async function submit(e: React.FormEvent) {
    e.preventDefault();
    setSubmitting(true);
    setRefusal(null);
    const r = await submitEnsemble({ spec: input });
    if ("data" in r) { router.push(`/ensembles/${r.data.ensembleId}`); return; }
    setSubmitting(false);
    setRefusal(r.error.message);
  }

  const ready = preview.status === "ok" && preview.data.ok;
  return (
    <form onSubmit={submit} className="grid gap-6 lg:grid-cols-[1fr_18rem]" data-testid="new-ensemble">
      <div className="space-y-5 min-w-0">
        <div role="tablist" aria-label="How to give the spec" className="flex gap-1 border-b border-line">
          {(["form", "file"] as Mode[]).map((m) => (
            <button key={m} type="button" role="tab" aria-selected={mode === m} onClick={() => switchMode(m)}
              className={`px-3 py-1.5 text-sm -mb-px border-b-2 ${mode === m ? "border-accent text-accent-strong font-medium" : "border-transparent text-ink-soft hover:text-ink"}`}>
              {m === "form" ? "Fill in the form" : "Paste or upload a spec file"}
            </button>
          ))}
        </div>
        {mode === "file" ? <SpecFileInput text={text} onText={(t) => { setRefusal(null); setText(t); }} /> : (
          <>
            <div className="grid gap-3 sm:grid-cols-2">
              <Field label="Name *" error={issuesAt(issues, "/name")}><input aria-label="Name" value={draft.name} onChange={(e) => update({ name: e.target.value })} className={inputClass} placeholder="ising2d L=16 temperature scan" /></Field>
              <Field label="Sampler *" hint={sampler?.description ?? undefined} error={issuesAt(issues, "/sampler")}>
                <select aria-label="Sampler" value={draft.sampler} onChange={(e) => { const s = samplers.find((x) => samplerKey(x) === e.target.value); update({ sampler: e.target.value, fixed: blankDraft(s, "").fixed, scan: [] }); }} className={inputClass}>
                  {samplers.map((s) => <option key={samplerKey(s)} value={samplerKey(s)}>{s.name} {s.version}</option>)}
                </select>
              </Field>
            </div>
            <Field label="Description" error={issuesAt(issues, "/description")}><input aria-label="Description" value={draft.description} onChange={(e) => update({ description: e.target.value })} className={inputClass} /></Field>
            <SamplerFields draft={draft} sampler={sampler} issues={issues} update={update} />
            <RunFields draft={draft} issues={issues} update={update} />
          </>
        )}
      </div>
      <div className="space-y-3 lg:sticky lg:top-4 self-start">
        <PreviewPanel state={preview} />
        {mode === "form" ? <PlannerPanel draft={draft} spec={spec} update={update} reservation={preview.status === "ok" ? preview.data.coreHoursNeeded : null} /> : null}
        {refusal ? <p role="alert" className="text-sm text-danger" data-testid="submit-error">Not submitted: {refusal}</p> : null}
        <Button type="submit" disabled={!ready || submitting} className="w-full justify-center">{submitting ? "Submitting…" : "Submit ensemble"}</Button>
        <p className="text-xxs text-ink-faint">Submitting reserves the core-hours above on the allocation; what the runs do not use is released when they end.</p>
      </div>
    </form>
  );
}
