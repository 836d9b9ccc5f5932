"use client";
// Set or lift a cap: one person's, everyone's default, or the per-ensemble ceiling; core-hours or a share.
import { useState } from "react";
import { useRouter } from "next/navigation";
import { setCap } from "@/app/(app)/allocations/actions/set-cap";
import { Button } from "@/components/ui/button";
import { inputClass } from "@/components/ui/field";

/** The cap form of one allocation; `people` are the group's members. */
export function CapForm({ id, people }: { id: string; people: { userId: string; name: string }[] }) {
  const router = useRouter();
  const [subject, setSubject] = useState("everyone");
  const [status, setStatus] = useState<string | null>(null);
  async function submit(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const f = new FormData(e.currentTarget);
    const amount = String(f.get("amount") ?? "").trim();
    const unit = String(f.get("unit"));
    const measure = amount === "" ? {} : unit === "share" ? { share: Number(amount) / 100 } : { coreHours: Number(amount) };
    const res = await setCap({ id, change: { subject: subject as "person", ...(subject === "person" ? { userId: String(f.get("userId")) } : {}), ...measure, reason: String(f.get("reason") ?? "") || undefined } });
    setStatus("error" in res ? `✕ ${res.error.message}` : amount === "" ? "✓ cap lifted" : "✓ cap set");
    if (!("error" in res)) router.refresh();
  }
  return (
    <form onSubmit={submit} className="flex flex-wrap items-end gap-2" aria-label="Set a cap">
      <label className="text-sm"><span className="block text-ink-soft mb-1">Cap for</span>
        <select value={subject} onChange={(e) => setSubject(e.target.value)} className={inputClass} aria-label="Cap for">
          <option value="everyone">everyone (default per person)</option><option value="person">one person</option><option value="ensemble">each ensemble (ceiling)</option>
        </select>
      </label>
      {subject === "person" ? (
        <label className="text-sm"><span className="block text-ink-soft mb-1">Person</span>
          <select name="userId" className={inputClass} aria-label="Person">{people.map((p) => <option key={p.userId} value={p.userId}>{p.name}</option>)}</select>
        </label>
      ) : null}
      <label className="text-sm"><span className="block text-ink-soft mb-1">Amount</span><input name="amount" type="number" step="any" min="0" className={`${inputClass} num w-28`} aria-label="Cap amount" placeholder="empty = lift" /></label>
      <label className="text-sm"><span className="block text-ink-soft mb-1">Unit</span>
        <select name="unit" className={inputClass} aria-label="Cap unit"><option value="coreHours">core-hours</option><option value="share">% of the grant</option></select>
      </label>
      <label className="text-sm grow"><span className="block text-ink-soft mb-1">Reason</span><input name="reason" className={inputClass} aria-label="Cap reason" /></label>
      <Button type="submit">Set cap</Button>
      {status ? <span role="status" className={`text-sm ${status.startsWith("✕") ? "text-danger" : "text-state-done"}`} data-testid="cap-status">{status}</span> : null}
    </form>
  );
}
