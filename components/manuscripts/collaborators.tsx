"use client";
// Who works on the draft: the creator, collaborators, and (for the creator or a leading PI) adding a researcher of the group.
import { useRouter } from "next/navigation";
import { useState } from "react";
import { addCollaborator } from "@/app/(app)/manuscripts/actions/add-collaborator";
import { Button } from "@/components/ui/button";
import { inputClass } from "@/components/ui/field";

type Person = { id: string; name: string | null };

/** The people line; `candidates` is empty when the caller may not add anyone. */
export function Collaborators({ id, createdBy, collaborators, candidates }: { id: string; createdBy: Person; collaborators: Person[]; candidates: { id: string; name: string; role: string }[] }) {
  const router = useRouter();
  const [pick, setPick] = useState(candidates[0]?.id ?? "");
  const [error, setError] = useState<string | null>(null);
  async function add() {
    setError(null);
    const r = await addCollaborator({ id, userId: pick });
    if ("error" in r) setError(r.error.message); else router.refresh();
  }
  return (
    <div className="flex flex-wrap items-center gap-x-4 gap-y-2 text-sm" data-testid="people">
      <span><span className="text-ink-soft">Created by</span> {createdBy.name}</span>
      <span data-testid="collaborators"><span className="text-ink-soft">Editors</span> {collaborators.length ? collaborators.map((c) => c.name).join(", ") : "none yet"}</span>
      {candidates.length ? (
        <span className="flex items-center gap-2">
          <select aria-label="Researcher to add as editor" value={pick} onChange={(e) => setPick(e.target.value)} className={`${inputClass} w-56`}>
            {candidates.map((c) => <option key={c.id} value={c.id}>{c.name} ({c.role})</option>)}
          </select>
          <Button variant="quiet" type="button" onClick={add} disabled={!pick}>Add editor</Button>
        </span>
      ) : null}
      {error ? <p role="alert" className="w-full text-danger">{error}</p> : null}
    </div>
  );
}
