// GET /api/v1/ensembles/:id/estimates – current estimates per point (?scope=run: per run); ?format=csv for CSV
import { withAuth } from "@/lib/auth/guard";
import { ANY } from "@/lib/auth/roles";
import { AppError } from "@/lib/errors";
import { ensembleEstimates, estimatesCsv } from "@/lib/ensembles/ensemble-estimates";
import { ensembleTarget } from "@/lib/ensembles/ensemble-target";

export const dynamic = "force-dynamic";

export const GET = withAuth<{ id: string }>({ roles: ANY, target: (p) => ensembleTarget(p.id), access: "read" }, async (req, { params }) => {
  const url = new URL(req.url);
  const scope = url.searchParams.get("scope") ?? "point";
  const format = url.searchParams.get("format") ?? "json";
  if (scope !== "point" && scope !== "run") throw new AppError("invalid", "?scope must be point or run", { issues: [{ path: "?scope", message: "must be point or run" }] });
  if (format !== "json" && format !== "csv") throw new AppError("invalid", "?format must be json or csv", { issues: [{ path: "?format", message: "must be json or csv" }] });
  const rows = await ensembleEstimates(params.id, scope);
  if (format === "json") return Response.json({ data: rows });
  return new Response(estimatesCsv(rows), {
    headers: { "content-type": "text/csv; charset=utf-8", "content-disposition": `attachment; filename="ensemble-${params.id}-${scope}-estimates.csv"` },
  });
});
