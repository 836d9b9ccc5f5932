// POST /api/v1/clusters/:id/check – test the connection: pinned host key, our key, scheduler health (coordinators, admins)
import { withAuth } from "@/lib/auth/guard";
import { COORDINATORS } from "@/lib/auth/roles";
import { uuidParam } from "@/lib/http/params";
import { checkCluster } from "@/lib/clusters/check-cluster";

export const POST = withAuth<{ id: string }>({ roles: COORDINATORS }, async (_req, { audit, params }) => {
  return Response.json({ data: await checkCluster(audit, uuidParam(params.id, "cluster")) });
});
