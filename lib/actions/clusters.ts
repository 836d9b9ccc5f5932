// Server-action definitions of the Clusters page (coordinators and admins).
import { defineAction } from "../auth/action";
import { COORDINATORS } from "../auth/roles";
import { clusterCreateSchema, clusterUpdateSchema, type ClusterChange, type ClusterInput } from "../clusters/cluster-input";
import { createCluster, updateCluster } from "../clusters/manage-clusters";
import { checkCluster, fetchHostKey } from "../clusters/check-cluster";

const id = { type: "string", format: "uuid" } as const;

export const createClusterAction = defineAction({
  name: "clusters.create", schema: clusterCreateSchema, policy: { roles: COORDINATORS },
  run: (i: ClusterInput, { audit }) => createCluster(audit, i),
});

export const updateClusterAction = defineAction({
  name: "clusters.update",
  schema: { type: "object", additionalProperties: false, required: ["id", "change"], properties: { id, change: clusterUpdateSchema } },
  policy: { roles: COORDINATORS },
  run: (i: { id: string; change: ClusterChange }, { audit }) => updateCluster(audit, i.id, i.change),
});

export const checkClusterAction = defineAction({
  name: "clusters.check",
  schema: { type: "object", additionalProperties: false, required: ["id"], properties: { id } },
  policy: { roles: COORDINATORS },
  run: (i: { id: string }, { audit }) => checkCluster(audit, i.id),
});

export const fetchHostKeyAction = defineAction({
  name: "clusters.fetchHostKey",
  schema: {
    type: "object", additionalProperties: false, required: ["host", "port"],
    properties: { host: clusterCreateSchema.properties.host, port: clusterCreateSchema.properties.port },
  },
  policy: { roles: COORDINATORS },
  run: (i: { host: string; port: number }) => fetchHostKey(i.host, i.port),
});
