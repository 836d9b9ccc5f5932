"use client";
// Shows the fingerprint a login node presents, for the coordinator to compare with the one they
// got out of band. It never fills the pinned field: trusting it is a person's decision.
import { useState } from "react";
import { fetchHostKey } from "@/app/(app)/clusters/actions/fetch-host-key";
import { Button } from "@/components/ui/button";

/** Reads host and port from the surrounding form. */
export function HostKeyProbe() {
  const [shown, setShown] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  async function probe(e: React.MouseEvent<HTMLButtonElement>) {
    const form = e.currentTarget.form!;
    const host = (form.elements.namedItem("host") as HTMLInputElement).value.trim();
    const port = Number((form.elements.namedItem("port") as HTMLInputElement).value || 22);
    setBusy(true);
    const res = await fetchHostKey({ host, port });
    setBusy(false);
    setShown("error" in res ? `✕ ${res.error.message}` : `${res.data.host}:${res.data.port} presents ${res.data.keyType} ${res.data.fingerprint}`);
  }
  return (
    <div className="text-sm flex flex-wrap items-center gap-2">
      <Button type="button" variant="quiet" onClick={probe} disabled={busy}>Fetch and show the server&apos;s fingerprint</Button>
      {shown ? <span role="status" className="mono text-xs break-all" data-testid="presented-host-key">{shown}</span> : null}
      <span className="text-xs text-ink-faint basis-full">Compare it with the fingerprint from the cluster&apos;s admins; if they differ, do not pin it.</span>
    </div>
  );
}
