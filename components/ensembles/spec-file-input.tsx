"use client";
import { inputClass } from "@/components/ui/field";

/** Paste a spec, or load a .json / .yaml file into the text box. */
export function SpecFileInput({ text, onText }: { text: string; onText: (t: string) => void }) {
  return (
    <div className="space-y-2">
      <div className="flex items-center gap-3 text-sm">
        <label className="rounded-md border border-line-strong bg-paper-raised px-3 py-1.5 font-medium hover:bg-paper-sunken cursor-pointer">
          Upload a spec file
          <input type="file" accept=".json,.yaml,.yml,application/json,text/yaml" className="sr-only" aria-label="Spec file"
            onChange={async (e) => { const f = e.target.files?.[0]; if (f) onText(await f.text()); }} />
        </label>
        <span className="text-ink-soft">or paste it below (JSON or YAML, format <span className="mono">ergodex.ensemble/1</span>)</span>
      </div>
      <textarea aria-label="Spec text" value={text} onChange={(e) => onText(e.target.value)} spellCheck={false} rows={24}
        className={`${inputClass} mono text-xs leading-5`} placeholder={'format: ergodex.ensemble/1\nname: …'} />
      <p className="text-xxs text-ink-faint">Schema for editors: <a className="mono text-accent hover:underline" href="/api/v1/schemas/ensemble-spec">/api/v1/schemas/ensemble-spec</a></p>
    </div>
  );
}
