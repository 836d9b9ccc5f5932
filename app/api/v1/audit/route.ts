// GET /api/v1/audit – the audit log (PIs: groups they lead; admins: all); ?actor=&action=&target=&from=&to=&page=&pageSize=; ?format=csv
import { withAuth } from "@/lib/auth/guard";
import { PIS } from "@/lib/auth/roles";
import { auditCsv, listAudit, parseAuditFilter } from "@/lib/audit/list-audit";

export const dynamic = "force-dynamic";

export const GET = withAuth({ roles: PIS }, async (req, { who }) => {
  const sp = new URL(req.url).searchParams;
  const filter = parseAuditFilter(sp);
  if (sp.get("format") === "csv") {
    const all = await listAudit(who, { ...filter, page: 1, pageSize: filter.pageSize ?? 10_000 });
    return new Response(auditCsv(all.rows), { headers: { "content-type": "text/csv; charset=utf-8", "content-disposition": `attachment; filename="ergodex-audit.csv"` } });
  }
  const { rows, ...page } = await listAudit(who, filter);
  return Response.json({ data: rows, ...page });
});
