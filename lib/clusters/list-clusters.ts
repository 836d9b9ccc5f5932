import "server-only";
import { db } from "@/models";

/** Clusters and samplers as everyone may see them (never a key). */
export async function listClustersAndSamplers() {
  const { Cluster, Sampler } = db();
  const [clusters, samplers] = await Promise.all([Cluster.findAll({ order: [["name", "ASC"]] }), Sampler.findAll({ order: [["name", "ASC"], ["version", "DESC"]] })]);
  return {
    clusters: clusters.map((c) => ({ id: c.id, name: c.name, kind: c.kind, host: c.host, port: c.port, username: c.username, hostKeyFingerprint: c.hostKeyFingerprint, slotLimit: c.slotLimit, healthy: c.healthy, healthNote: c.healthNote, workDir: c.workDir })),
    samplers: samplers.map((s) => ({ id: s.id, name: s.name, version: s.version, description: s.description, observables: (s.observables as { name: string }[]).map((o) => o.name) })),
  };
}
