import { hasRole, pageIdentity } from "@/lib/auth/page-identity";
import { PIS } from "@/lib/auth/roles";
import { listAudit, parseAuditFilter } from "@/lib/audit/list-audit";
import { AppError } from "@/lib/errors";
import { PageHeader } from "@/components/ui/page-header";
import { Refusal } from "@/components/ui/refusal";
import { AuditFilterForm } from "@/components/audit/audit-filter-form";
import { AuditTable } from "@/components/audit/audit-table";

export const metadata = { title: "Audit" };
export const dynamic = "force-dynamic";

export default async function AuditPage({ searchParams }: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const who = await pageIdentity();
  if (!hasRole(who, PIS)) return <Refusal what="The audit log" who="PIs (their groups) and admins" />;
  const raw = await searchParams;
  const sp = new URLSearchParams(Object.entries(raw).flatMap(([k, v]) => (typeof v === "string" ? [[k, v]] : [])));
  let error: string | null = null;
  let result: Awaited<ReturnType<typeof listAudit>> = { rows: [], total: 0, page: 1, pageSize: 50 };
  try {
    // A date picker's "to" day means through the end of that day (UTC), not its first instant.
    const q = new URLSearchParams(sp);
    const to = q.get("to");
    if (to && /^\d{4}-\d{2}-\d{2}$/.test(to)) q.set("to", `${to}T23:59:59.999Z`);
    result = await listAudit(who, parseAuditFilter(q));
  } catch (err) {
    if (!(err instanceof AppError)) throw err;
    error = err.message;
  }
  const csv = new URLSearchParams(sp); csv.delete("page"); csv.delete("pageSize"); csv.set("format", "csv");
  return (
    <>
      <PageHeader title="Audit" purpose={who.role === "admin" ? "Every change anyone made, who made it, to what, when and from where." : "Every change made in the groups you lead: who, what, to which target, when and from where."}
        actions={<a href={`/api/v1/audit?${csv}`} className="text-sm text-accent hover:underline self-center" data-testid="audit-csv">Export CSV</a>} />
      <AuditFilterForm values={Object.fromEntries(sp)} />
      {error ? <p role="alert" className="text-danger text-sm my-3">{error} — correct the filter above.</p> : null}
      <AuditTable rows={JSON.parse(JSON.stringify(result.rows))} total={result.total} page={result.page} pageSize={result.pageSize} query={Object.fromEntries(sp)} />
    </>
  );
}
