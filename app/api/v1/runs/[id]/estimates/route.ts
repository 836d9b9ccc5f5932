// POST /api/v1/runs/:id/estimates – save a re-analysis (cut/window) as a new estimate version; 409 beneath a frozen manuscript
import { withAuth } from "@/lib/auth/guard";
import { RESEARCHERS } from "@/lib/auth/roles";
import { runTarget } from "@/lib/ensembles/ensemble-target";
import { parseAnalysisChoice, reanalysisBodySchema } from "@/lib/explorer/analysis-options";
import { saveReanalysis } from "@/lib/explorer/save-reanalysis";
import { readJson } from "@/lib/http/read-json";

export const dynamic = "force-dynamic";

export const POST = withAuth<{ id: string }>({ roles: RESEARCHERS, target: (p) => runTarget(p.id), access: "act" }, async (req, { who, audit, params }) => {
  const body = await readJson<Record<string, unknown>>(req, reanalysisBodySchema);
  const data = await saveReanalysis(audit, who, params.id.toLowerCase(), parseAnalysisChoice(body));
  return Response.json({ data }, { status: 201 });
});
