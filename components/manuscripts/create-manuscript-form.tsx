"use client";
// New manuscript: working title, group (one the PI leads), target journal (optional).
import { useRouter } from "next/navigation";
import { useState } from "react";
import { createManuscript } from "@/app/(app)/manuscripts/actions/create-manuscript";
import { Button } from "@/components/ui/button";
import { Field, inputClass } from "@/components/ui/field";

/** The form; on success it opens the new manuscript. */
export function CreateManuscriptForm({ groups }: { groups: { id: string; name: string }[] }) {
  const router = useRouter();
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  async function submit(form: FormData) {
    setBusy(true); setError(null);
    const r = await createManuscript({ groupId: String(form.get("groupId")), title: String(form.get("title")), journal: String(form.get("journal") || "") || null });
    setBusy(false);
    if ("error" in r) setError(r.error.message); else router.push(`/manuscripts/${r.data.id}`);
  }
  return (
    <form action={submit} className="grid gap-3 sm:grid-cols-4 items-end rounded-lg border border-line bg-paper-raised p-4 mb-6" aria-label="New manuscript">
      <Field label="Working title"><input name="title" required className={inputClass} /></Field>
      <Field label="Group"><select name="groupId" className={inputClass}>{groups.map((g) => <option key={g.id} value={g.id}>{g.name}</option>)}</select></Field>
      <Field label="Target journal (optional)"><input name="journal" className={inputClass} /></Field>
      <div><Button type="submit" disabled={busy}>Create manuscript</Button></div>
      {error ? <p role="alert" className="sm:col-span-4 text-sm text-danger">{error}</p> : null}
    </form>
  );
}
