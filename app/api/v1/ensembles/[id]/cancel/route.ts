// POST /api/v1/ensembles/:id/cancel – cancel every run that has not ended (queued at once, on-cluster via the broker)
import { withAuth } from "@/lib/auth/guard";
import { RESEARCHERS } from "@/lib/auth/roles";
import { cancelEnsemble } from "@/lib/ensembles/cancel-ensemble";
import { ensembleTarget } from "@/lib/ensembles/ensemble-target";

export const POST = withAuth<{ id: string }>({ roles: RESEARCHERS, target: (p) => ensembleTarget(p.id), access: "act" }, async (_req, { who, audit, params }) =>
  Response.json({ data: await cancelEnsemble(audit, who, params.id) }));
