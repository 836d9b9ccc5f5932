// GET /api/v1/provenance/estimates/:id – PROV-JSON of an estimate (?format=listing-csv|listing-json for the plain listing)
import { withAuth } from "@/lib/auth/guard";
import { ANY } from "@/lib/auth/roles";
import { estimateTarget, provForEstimate } from "@/lib/provenance/prov-for-estimate";
import { provResponse } from "@/lib/provenance/prov-response";

export const dynamic = "force-dynamic";

export const GET = withAuth<{ id: string }>({ roles: ANY, target: (p) => estimateTarget(p.id), access: "read" }, async (req, { params }) =>
  provResponse(req, await provForEstimate(params.id), `estimate-${params.id}`));
