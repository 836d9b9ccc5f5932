// GET /api/v1/provenance/ensembles/:id – PROV-JSON of an ensemble (?format=listing-csv|listing-json for the plain listing)
import { withAuth } from "@/lib/auth/guard";
import { ANY } from "@/lib/auth/roles";
import { ensembleTarget } from "@/lib/ensembles/ensemble-target";
import { provForEnsemble } from "@/lib/provenance/prov-for";
import { provResponse } from "@/lib/provenance/prov-response";

export const dynamic = "force-dynamic";

export const GET = withAuth<{ id: string }>({ roles: ANY, target: (p) => ensembleTarget(p.id), access: "read" }, async (req, { params }) =>
  provResponse(req, await provForEnsemble(params.id), `ensemble-${params.id}`));
