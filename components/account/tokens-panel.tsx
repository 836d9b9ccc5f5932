"use client";
import { useState } from "react";
import { createToken } from "@/app/(app)/account/actions/create-token";
import { revokeToken } from "@/app/(app)/account/actions/revoke-token";
import { Field, inputClass } from "@/components/ui/field";
import { Button } from "@/components/ui/button";
import { Time } from "@/components/ui/time";

type T = { id: string; name: string; prefix: string; createdAt: string; expiresAt: string | null; revokedAt: string | null; lastUsedAt: string | null };

export function TokensPanel({ tokens }: { tokens: T[] }) {
  const [fresh, setFresh] = useState<string | null>(null);
  const [error, setError] = useState<string | null>(null);
  async function create(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const f = new FormData(e.currentTarget);
    const days = String(f.get("days") ?? "");
    const res = await createToken({ name: String(f.get("name")), expiresInDays: days ? Number(days) : null });
    if ("error" in res) { setError(res.error.message); setFresh(null); } else { setFresh(res.data.token); setError(null); e.currentTarget?.reset(); }
  }
  return (
    <div className="space-y-4">
      <form onSubmit={create} className="flex items-end gap-2">
        <div className="flex-1"><Field label="Name"><input name="name" required maxLength={80} placeholder="laptop CLI" className={inputClass} /></Field></div>
        <div className="w-28"><Field label="Expires (days)"><input name="days" type="number" min={1} max={365} placeholder="never" className={inputClass} /></Field></div>
        <Button type="submit">Create</Button>
      </form>
      {error ? <p role="alert" className="text-sm text-danger">{error}</p> : null}
      {fresh ? (
        <div className="rounded-md border border-accent bg-accent-soft p-3 text-sm" data-testid="new-token">
          <p className="font-medium">Copy this token now: it is shown only once.</p>
          <code className="mono break-all select-all">{fresh}</code>
        </div>
      ) : null}
      <table className="data">
        <thead><tr><th>Name</th><th>Token</th><th>Created</th><th>Status</th><th /></tr></thead>
        <tbody>
          {tokens.length === 0 ? <tr><td colSpan={5} className="text-ink-soft">No tokens yet.</td></tr> : tokens.map((t) => (
            <tr key={t.id}>
              <td>{t.name}</td>
              <td className="mono">{t.prefix}…</td>
              <td className="text-xs"><Time at={t.createdAt} /></td>
              <td className="text-xs">{t.revokedAt ? "revoked" : t.expiresAt && new Date(t.expiresAt) < new Date() ? "expired" : t.expiresAt ? <>until <Time at={t.expiresAt} /></> : "active"}</td>
              <td>{!t.revokedAt ? <Button variant="danger" onClick={async () => { const r = await revokeToken({ id: t.id }); if ("error" in r) setError(r.error.message); }}>Revoke</Button> : null}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
