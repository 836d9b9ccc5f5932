// GET /api/v1/allocations/:id/report – monthly usage as CSV (totals; per-person rows as the caller may see them)
import { withAuth } from "@/lib/auth/guard";
import { ANY } from "@/lib/auth/roles";
import { allocationTarget } from "@/lib/allocations/allocation-target";
import { monthlyReportCsv } from "@/lib/allocations/monthly-report";

export const dynamic = "force-dynamic";

export const GET = withAuth<{ id: string }>({ roles: ANY, target: (p) => allocationTarget(p.id), access: "read" }, async (_req, { who, params }) => {
  const { fileName, csv } = await monthlyReportCsv(who, params.id);
  return new Response(csv, { headers: { "content-type": "text/csv; charset=utf-8", "content-disposition": `attachment; filename="${fileName}"` } });
});
