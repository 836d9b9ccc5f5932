"use client";
// Add an exhibit to a draft: a label ("Fig. 2", "Table 1"), a caption, and one of the group's saved explorer views behind it.
import Link from "next/link";
import { useRouter } from "next/navigation";
import { useState } from "react";
import { addExhibit } from "@/app/(app)/manuscripts/actions/add-exhibit";
import { Button } from "@/components/ui/button";
import { Field, inputClass } from "@/components/ui/field";

/** The form; `views` are the saved views shared with the manuscript's group. */
export function AddExhibitForm({ id, views }: { id: string; views: { id: string; name: string; queryString: string }[] }) {
  const router = useRouter();
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const [label, setLabel] = useState("");
  const [kind, setKind] = useState<"figure" | "table">("figure");
  async function submit(form: FormData) {
    setBusy(true); setError(null);
    const r = await addExhibit({ id, exhibit: { label: label.trim(), kind, caption: String(form.get("caption") || "") || null, viewId: String(form.get("viewId")) } });
    setBusy(false);
    if ("error" in r) setError(r.error.message);
    else { setLabel(""); setKind("figure"); (document.getElementById("add-exhibit") as HTMLFormElement | null)?.reset(); router.refresh(); }
  }
  if (views.length === 0) {
    return (
      <p className="rounded-lg border border-dashed border-line-strong p-4 text-sm text-ink-soft" data-testid="no-views">
        No saved view is shared with this group yet. Set up a table or plot in the <Link className="text-accent hover:underline" href="/explorer">explorer</Link> and
        use <b>Add to manuscript</b> there (or save the view and come back).
      </p>
    );
  }
  return (
    <form id="add-exhibit" action={submit} aria-label="Add exhibit" className="grid items-end gap-3 rounded-lg border border-line bg-paper-raised p-4 md:grid-cols-[8rem_7rem_minmax(0,1fr)_minmax(0,1fr)_auto]">
      <Field label="Label"><input name="label" required placeholder="Fig. 2" value={label} className={inputClass}
        onChange={(e) => { setLabel(e.target.value); if (/^tab/i.test(e.target.value)) setKind("table"); else if (/^fig/i.test(e.target.value)) setKind("figure"); }} /></Field>
      <Field label="Kind"><select name="kind" value={kind} onChange={(e) => setKind(e.target.value as "figure" | "table")} className={inputClass}><option value="figure">figure</option><option value="table">table</option></select></Field>
      <Field label="Saved view"><select name="viewId" required className={inputClass}>{views.map((v) => <option key={v.id} value={v.id}>{v.name}</option>)}</select></Field>
      <Field label="Caption (optional)"><input name="caption" className={inputClass} placeholder="Energy per site against T" /></Field>
      <div className="pb-0.5"><Button type="submit" disabled={busy || !label.trim()}>{busy ? "Adding…" : "Add exhibit"}</Button></div>
      {error ? <p role="alert" className="text-sm text-danger md:col-span-5">{error}</p> : null}
    </form>
  );
}
