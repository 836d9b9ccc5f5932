// GET /api/v1/runs/:id/spectrum – counting function with its Weyl fit and heat-kernel d_s(σ), for runs that stored a spectrum
import { withAuth } from "@/lib/auth/guard";
import { ANY } from "@/lib/auth/roles";
import { runTarget } from "@/lib/ensembles/ensemble-target";
import { runSpectrum } from "@/lib/explorer/run-spectrum";

export const dynamic = "force-dynamic";

export const GET = withAuth<{ id: string }>({ roles: ANY, target: (p) => runTarget(p.id), access: "read" }, async (_req, { params }) =>
  Response.json({ data: await runSpectrum(params.id.toLowerCase()) }));
