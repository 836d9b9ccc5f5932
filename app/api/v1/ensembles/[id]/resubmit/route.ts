// POST /api/v1/ensembles/:id/resubmit – queue the failed runs again, with a new reservation
import { withAuth } from "@/lib/auth/guard";
import { RESEARCHERS } from "@/lib/auth/roles";
import { ensembleTarget } from "@/lib/ensembles/ensemble-target";
import { resubmitFailed } from "@/lib/ensembles/resubmit-failed";

export const POST = withAuth<{ id: string }>({ roles: RESEARCHERS, target: (p) => ensembleTarget(p.id), access: "act" }, async (_req, { who, audit, params }) =>
  Response.json({ data: await resubmitFailed(audit, who, params.id) }));
