// GET /api/v1/ensembles/:id – one ensemble: counts per state, reserved/charged core-hours, points × replicas grid
import { withAuth } from "@/lib/auth/guard";
import { ANY } from "@/lib/auth/roles";
import { ensembleDetail } from "@/lib/ensembles/ensemble-detail";
import { ensembleTarget } from "@/lib/ensembles/ensemble-target";

export const dynamic = "force-dynamic";

export const GET = withAuth<{ id: string }>({ roles: ANY, target: (p) => ensembleTarget(p.id), access: "read" }, async (_req, { params }) =>
  Response.json({ data: await ensembleDetail(params.id) }));
