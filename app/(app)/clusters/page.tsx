import { pageIdentity, hasRole } from "@/lib/auth/page-identity";
import { COORDINATORS } from "@/lib/auth/roles";
import { listClustersAndSamplers } from "@/lib/clusters/list-clusters";
import { listClusters } from "@/lib/clusters/manage-clusters";
import { PageHeader } from "@/components/ui/page-header";
import { Card } from "@/components/ui/card";
import { ClusterAdminRow } from "@/components/clusters/cluster-admin-row";
import { ClusterForm } from "@/components/clusters/cluster-form";

export const metadata = { title: "Clusters" };

const KIND = { "fake-ssh": "fake node", "batch-ssh": "batch scheduler over SSH" } as Record<string, string>;

export default async function ClustersPage() {
  const who = await pageIdentity();
  const staff = hasRole(who, COORDINATORS);
  const { clusters, samplers } = await listClustersAndSamplers();
  // Coordinators and admins get the full settings (never a key); everyone else the public listing.
  const detailed = staff ? new Map((await listClusters()).map((c) => [c.id, c])) : null;
  return (
    <>
      <PageHeader title="Clusters" purpose="Where runs execute, how Ergodex reaches them, and the samplers they can run." />
      <div className="space-y-4">
        <Card title="Clusters">
          <table className="data" data-testid="clusters">
            <thead><tr><th>Name</th><th>Kind</th><th>Login</th><th>Pinned host key</th><th className="n">Slots</th><th>Health</th></tr></thead>
            <tbody>{clusters.map((c) => {
              const d = detailed?.get(c.id);
              return [
                <tr key={c.id}>
                  <td className="font-medium">{c.name}{d && !d.active ? <span className="ml-1 text-xs text-ink-faint">(inactive)</span> : null}</td>
                  <td>{KIND[c.kind] ?? c.kind}</td>
                  <td className="mono">{c.username}@{c.host}:{c.port}</td>
                  <td className="mono text-xs break-all">{c.hostKeyFingerprint}</td>
                  <td className="n">{c.slotLimit}</td>
                  <td>{c.healthy ? "✓ healthy" : `✕ ${c.healthNote ?? "unhealthy"}`}</td>
                </tr>,
                d ? (
                  <tr key={`${c.id}-admin`}><td colSpan={6}>
                    {d.kind === "batch-ssh" ? (
                      <p className="text-xs text-ink-soft mb-2 mono">
                        work root {d.workDir} · partition {String(d.settings.partition ?? "default")} · account {String(d.settings.account ?? "none")} ·
                        query every {String(d.settings.pollSeconds ?? 60)} s · submit every {String(d.settings.submitSeconds ?? 5)} s
                        {typeof d.settings.maxWallSeconds === "number" ? ` · max wall ${d.settings.maxWallSeconds / 60} min` : ""}
                      </p>
                    ) : null}
                    <ClusterAdminRow cluster={d} />
                  </td></tr>
                ) : null,
              ];
            })}
            </tbody>
          </table>
        </Card>
        {staff ? (
          <Card title="Add a cluster">
            <p className="text-sm text-ink-soft mb-3">For a real cluster see docs/batch-cluster.md: a dedicated account, its key, the host key obtained from the cluster&apos;s admins, and the samplers installed there.</p>
            <ClusterForm />
          </Card>
        ) : null}
        <Card title="Samplers">
          <table className="data" data-testid="samplers">
            <thead><tr><th>Sampler</th><th>Version</th><th>Observables</th><th>What it samples</th></tr></thead>
            <tbody>{samplers.map((s) => (
              <tr key={s.id}><td className="mono">{s.name}</td><td className="mono">{s.version}</td><td className="mono text-xs">{s.observables.join(", ")}</td><td className="text-sm">{s.description}</td></tr>))}
            </tbody>
          </table>
        </Card>
      </div>
    </>
  );
}
