"use client";
// A cluster's coordinator controls: test the connection, edit, deactivate or reactivate.
import { useState } from "react";
import { checkCluster } from "@/app/(app)/clusters/actions/check-cluster";
import { updateCluster } from "@/app/(app)/clusters/actions/update-cluster";
import type { ClusterView } from "@/lib/clusters/manage-clusters";
import { Button } from "@/components/ui/button";
import { ClusterForm } from "./cluster-form";

/** Controls under one cluster's row. */
export function ClusterAdminRow({ cluster }: { cluster: ClusterView }) {
  const [editing, setEditing] = useState(false);
  const [status, setStatus] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  async function test() {
    setBusy(true); setStatus("connecting…");
    const res = await checkCluster({ id: cluster.id });
    setBusy(false);
    setStatus("error" in res ? `✕ ${res.error.message}` : res.data.ok ? `✓ ${res.data.detail}` : `✕ ${res.data.detail}`);
  }
  async function toggle() {
    if (cluster.active && !confirm(`Deactivate ${cluster.name}? Nothing new is sent there; runs already there are still watched.`)) return;
    const res = await updateCluster({ id: cluster.id, change: { active: !cluster.active } });
    setStatus("error" in res ? `✕ ${res.error.message}` : res.data.active ? "reactivated" : "deactivated");
  }
  return (
    <div className="space-y-2">
      <div className="flex flex-wrap items-center gap-2">
        <Button variant="quiet" onClick={test} disabled={busy}>Test connection</Button>
        <Button variant="quiet" onClick={() => setEditing(!editing)}>{editing ? "Close" : "Edit"}</Button>
        <Button variant={cluster.active ? "danger" : "quiet"} onClick={toggle}>{cluster.active ? "Deactivate" : "Reactivate"}</Button>
        {status ? <span role="status" className="text-sm" data-testid={`cluster-status-${cluster.name}`}>{status}</span> : null}
      </div>
      {editing ? <ClusterForm cluster={cluster} onDone={() => setEditing(false)} /> : null}
    </div>
  );
}
