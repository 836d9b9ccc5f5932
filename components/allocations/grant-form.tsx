"use client";
// Grant a new allocation (coordinators and admins): group, optional cluster, period, core-hours.
import { useState } from "react";
import { useRouter } from "next/navigation";
import { grantAllocation } from "@/app/(app)/allocations/actions/grant-allocation";
import { Button } from "@/components/ui/button";
import { Field, inputClass } from "@/components/ui/field";

type Option = { id: string; name: string };

/** The grant form; field errors come back from the server action by JSON path. */
export function GrantForm({ groups, clusters }: { groups: Option[]; clusters: Option[] }) {
  const router = useRouter();
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [status, setStatus] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  async function submit(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const f = new FormData(e.currentTarget);
    setBusy(true); setErrors({}); setStatus(null);
    const res = await grantAllocation({
      groupId: String(f.get("groupId")), name: String(f.get("name")), periodStart: String(f.get("periodStart")), periodEnd: String(f.get("periodEnd")),
      coreHours: Number(f.get("coreHours")), clusterId: f.get("clusterId") ? String(f.get("clusterId")) : null, note: String(f.get("note") ?? "") || undefined,
    });
    setBusy(false);
    if ("error" in res) {
      setErrors(Object.fromEntries((res.error.issues ?? []).map((i) => [i.path.replace(/^\//, ""), i.message])));
      setStatus(`✕ ${res.error.message}`);
      return;
    }
    router.push(`/allocations/${res.data.id}`);
  }
  return (
    <form onSubmit={submit} className="grid grid-cols-2 gap-3 max-w-2xl" aria-label="Grant an allocation">
      <Field label="Group" error={errors.groupId}>
        <select name="groupId" className={inputClass} aria-label="Group" required>{groups.map((g) => <option key={g.id} value={g.id}>{g.name}</option>)}</select>
      </Field>
      <Field label="Name" error={errors.name} hint="unique within the group, e.g. 2027 main">
        <input name="name" className={inputClass} aria-label="Name" required />
      </Field>
      <Field label="Period starts" error={errors.periodStart}><input type="date" name="periodStart" className={inputClass} aria-label="Period starts" required /></Field>
      <Field label="Period ends (exclusive)" error={errors.periodEnd}><input type="date" name="periodEnd" className={inputClass} aria-label="Period ends" required /></Field>
      <Field label="Core-hours granted" error={errors.coreHours}><input type="number" min="0.0001" step="any" name="coreHours" className={`${inputClass} num`} aria-label="Core-hours granted" required /></Field>
      <Field label="Cluster" error={errors.clusterId} hint="hours for one cluster only, or any">
        <select name="clusterId" className={inputClass} aria-label="Cluster"><option value="">any cluster</option>{clusters.map((c) => <option key={c.id} value={c.id}>{c.name}</option>)}</select>
      </Field>
      <div className="col-span-2"><Field label="Note" hint="e.g. the decision that granted it"><input name="note" className={inputClass} aria-label="Note" /></Field></div>
      <div className="col-span-2 flex items-center gap-3">
        <Button type="submit" disabled={busy}>Grant</Button>
        {status ? <span role="status" className="text-sm text-danger">{status}</span> : null}
      </div>
    </form>
  );
}
