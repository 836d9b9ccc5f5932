// GET /api/v1/clusters – every cluster with its settings, never its key (coordinators, admins)
// POST /api/v1/clusters – create a cluster (coordinators, admins)
import { withAuth } from "@/lib/auth/guard";
import { COORDINATORS } from "@/lib/auth/roles";
import { readJson } from "@/lib/http/read-json";
import { clusterCreateSchema, type ClusterInput } from "@/lib/clusters/cluster-input";
import { createCluster, listClusters } from "@/lib/clusters/manage-clusters";

export const GET = withAuth({ roles: COORDINATORS }, async () => Response.json({ data: await listClusters() }));

export const POST = withAuth({ roles: COORDINATORS }, async (req, { audit }) => {
  const body = await readJson<ClusterInput>(req, clusterCreateSchema);
  return Response.json({ data: await createCluster(audit, body) }, { status: 201 });
});
