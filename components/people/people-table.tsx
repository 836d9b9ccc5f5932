"use client";
import { useState } from "react";
import { updatePerson } from "@/app/(app)/people/actions/update-person";
import { setMembership } from "@/app/(app)/people/actions/set-membership";
import { ROLES } from "@/lib/auth/roles";
import { Time } from "@/components/ui/time";
import { Button } from "@/components/ui/button";

type G = { id: string; name: string };
type P = { id: string; email: string; name: string; role: string; active: boolean; lastSignInAt: string | null; groups: { id: string; name: string; isLead: boolean }[] };

export function PeopleTable({ people, groups, me }: { people: P[]; groups: G[]; me: string }) {
  const [error, setError] = useState<string | null>(null);
  const report = (r: { error?: { message: string } } | object) => setError("error" in r && r.error ? r.error.message : null);
  return (
    <>
      {error ? <p role="alert" className="text-sm text-danger mb-2">{error}</p> : null}
      <table className="data" data-testid="people">
        <thead><tr><th>Name</th><th>Role</th><th>Groups</th><th>Last sign-in</th><th>Status</th></tr></thead>
        <tbody>
          {people.map((p) => (
            <tr key={p.id} className={p.active ? "" : "opacity-60"}>
              <td><div className="font-medium">{p.name}</div><div className="text-xs text-ink-soft">{p.email}</div></td>
              <td>
                <select aria-label={`role of ${p.name}`} defaultValue={p.role} disabled={p.id === me} className="rounded border border-line-strong bg-paper-raised px-1.5 py-1 text-sm"
                  onChange={async (e) => report(await updatePerson({ id: p.id, change: { role: e.target.value } }))}>
                  {ROLES.map((r) => <option key={r} value={r}>{r}</option>)}
                </select>
              </td>
              <td className="text-sm">
                {groups.map((g) => {
                  const m = p.groups.find((x) => x.id === g.id);
                  return (
                    <label key={g.id} className="flex items-center gap-1.5">
                      <input type="checkbox" checked={Boolean(m)} onChange={async (e) => report(await setMembership({ userId: p.id, groupId: g.id, member: e.target.checked }))} />
                      {g.name}
                      {m ? <button type="button" className="text-xxs text-accent underline" onClick={async () => report(await setMembership({ userId: p.id, groupId: g.id, member: true, isLead: !m.isLead }))}>{m.isLead ? "lead ✓" : "make lead"}</button> : null}
                    </label>
                  );
                })}
              </td>
              <td className="text-xs">{p.lastSignInAt ? <Time at={p.lastSignInAt} /> : "never"}</td>
              <td>
                {p.id === me ? <span className="text-xs text-ink-soft">you</span> : (
                  <Button variant={p.active ? "danger" : "quiet"} onClick={async () => report(await updatePerson({ id: p.id, change: { active: !p.active } }))}>
                    {p.active ? "Deactivate" : "Reactivate"}
                  </Button>
                )}
              </td>
            </tr>
          ))}
        </tbody>
      </table>
    </>
  );
}
