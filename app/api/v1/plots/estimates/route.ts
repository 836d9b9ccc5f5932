// GET /api/v1/plots/estimates – data behind an explorer plot: observable vs parameter x, lines by ensemble or param (&format=csv|json)
import { withAuth } from "@/lib/auth/guard";
import { ANY } from "@/lib/auth/roles";
import { exportFormat, exportPlot, exportResponse } from "@/lib/explorer/export";
import { parsePlotSpec, plotSeries } from "@/lib/explorer/plot-series";
import { parseExplorerQuery } from "@/lib/explorer/query";

export const dynamic = "force-dynamic";

export const GET = withAuth({ roles: ANY }, async (req, { who }) => {
  const sp = new URL(req.url).searchParams;
  const format = exportFormat(sp);
  const plot = parsePlotSpec(sp);
  for (const k of ["format", "x", "groupBy"]) sp.delete(k);
  const q = { ...parseExplorerQuery(sp), ...plot };
  const data = await plotSeries(who, q);
  if (format) return exportResponse(exportPlot(who, q, data, format));
  const { rows: _rows, ...body } = data;
  return Response.json({ data: body });
});
