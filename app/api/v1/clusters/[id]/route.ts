// PATCH /api/v1/clusters/:id – change a cluster's settings, key or fingerprint, or deactivate it (coordinators, admins)
import { withAuth } from "@/lib/auth/guard";
import { COORDINATORS } from "@/lib/auth/roles";
import { readJson } from "@/lib/http/read-json";
import { uuidParam } from "@/lib/http/params";
import { clusterUpdateSchema, type ClusterChange } from "@/lib/clusters/cluster-input";
import { updateCluster } from "@/lib/clusters/manage-clusters";

export const PATCH = withAuth<{ id: string }>({ roles: COORDINATORS }, async (req, { audit, params }) => {
  const id = uuidParam(params.id, "cluster");
  const body = await readJson<ClusterChange>(req, clusterUpdateSchema);
  return Response.json({ data: await updateCluster(audit, id, body) });
});
