// GET /api/v1/runs/:id – one run: fields, parameters, seed, events timeline, current estimates
import { withAuth } from "@/lib/auth/guard";
import { ANY } from "@/lib/auth/roles";
import { runTarget } from "@/lib/ensembles/ensemble-target";
import { runDetail } from "@/lib/ensembles/run-detail";

export const dynamic = "force-dynamic";

export const GET = withAuth<{ id: string }>({ roles: ANY, target: (p) => runTarget(p.id), access: "read" }, async (_req, { params }) =>
  Response.json({ data: await runDetail(params.id) }));
