import { pageIdentity } from "@/lib/auth/page-identity";
import { listClustersAndSamplers } from "@/lib/clusters/list-clusters";
import { PageHeader } from "@/components/ui/page-header";
import { Card } from "@/components/ui/card";

export const metadata = { title: "Clusters" };

export default async function ClustersPage() {
  await pageIdentity();
  const { clusters, samplers } = await listClustersAndSamplers();
  return (
    <>
      <PageHeader title="Clusters" purpose="Where runs execute, how Ergodex reaches them, and the samplers they can run." />
      <div className="space-y-4">
        <Card title="Clusters">
          <table className="data" data-testid="clusters">
            <thead><tr><th>Name</th><th>Kind</th><th>Login</th><th>Pinned host key</th><th className="n">Slots</th><th>Health</th></tr></thead>
            <tbody>{clusters.map((c) => (
              <tr key={c.id}>
                <td className="font-medium">{c.name}</td><td>{c.kind}</td>
                <td className="mono">{c.username}@{c.host}:{c.port}</td>
                <td className="mono text-xs break-all">{c.hostKeyFingerprint}</td>
                <td className="n">{c.slotLimit}</td>
                <td>{c.healthy ? "✓ healthy" : `✕ ${c.healthNote ?? "unhealthy"}`}</td>
              </tr>))}
            </tbody>
          </table>
        </Card>
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
