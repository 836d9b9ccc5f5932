// GET /api/v1/provenance/runs/:id – PROV-JSON of a run (?format=listing-csv|listing-json for the plain listing)
import { withAuth } from "@/lib/auth/guard";
import { ANY } from "@/lib/auth/roles";
import { runTarget } from "@/lib/ensembles/ensemble-target";
import { provForRun } from "@/lib/provenance/prov-for";
import { provResponse } from "@/lib/provenance/prov-response";

export const dynamic = "force-dynamic";

export const GET = withAuth<{ id: string }>({ roles: ANY, target: (p) => runTarget(p.id), access: "read" }, async (req, { params }) =>
  provResponse(req, await provForRun(params.id), `run-${params.id}`));
