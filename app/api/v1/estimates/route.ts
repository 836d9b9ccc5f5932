// GET /api/v1/estimates – the explorer table: current estimates by filter, sort and page (&format=csv|json exports every page)
import { withAuth } from "@/lib/auth/guard";
import { ANY } from "@/lib/auth/roles";
import { exportFormat, exportResponse, exportTable } from "@/lib/explorer/export";
import { canonicalQueryString, parseExplorerQuery } from "@/lib/explorer/query";
import { queryEstimates } from "@/lib/explorer/query-estimates";

export const dynamic = "force-dynamic";

export const GET = withAuth({ roles: ANY }, async (req, { who }) => {
  const sp = new URL(req.url).searchParams;
  const format = exportFormat(sp);
  sp.delete("format");
  const q = parseExplorerQuery(sp);
  if (format) return exportResponse(await exportTable(who, q, format));
  return Response.json({ data: await queryEstimates(who, q), query: q, queryString: canonicalQueryString(q) });
});
