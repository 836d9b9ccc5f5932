// GET /api/v1/runs/:id/analysis – one observable's series, cut, ACF with window, tau_int, blocking and the recomputed estimate (not saved)
import { withAuth } from "@/lib/auth/guard";
import { ANY } from "@/lib/auth/roles";
import { runTarget } from "@/lib/ensembles/ensemble-target";
import { parseAnalysisChoice } from "@/lib/explorer/analysis-options";
import { runAnalysis } from "@/lib/explorer/run-analysis";

export const dynamic = "force-dynamic";

export const GET = withAuth<{ id: string }>({ roles: ANY, target: (p) => runTarget(p.id), access: "read" }, async (req, { params }) =>
  Response.json({ data: await runAnalysis(params.id.toLowerCase(), parseAnalysisChoice(new URL(req.url).searchParams)) }));
