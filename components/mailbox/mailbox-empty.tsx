/** What arrives here, for a mailbox that has received nothing (or nothing matching the search). */
export function MailboxEmpty({ q, server }: { q: string; server: string }) {
  if (q) return <p className="text-sm text-ink-soft">No message matches “{q}”.</p>;
  return (
    <div className="rounded-lg border border-dashed border-line-strong p-6 text-sm text-ink-soft max-w-2xl" data-testid="mailbox-empty">
      <p className="font-medium text-ink">No e-mail has arrived yet.</p>
      <p className="mt-1">Every message Ergodex writes is queued in its outbox and delivered to the local mail server ({server}), which keeps it here:</p>
      <ul className="mt-2 list-disc pl-5 space-y-0.5">
        <li>failure digests to an ensemble’s owner: which runs failed, why, with links (one e-mail per ensemble per few minutes);</li>
        <li>cluster faults (host key mismatch, unreachable) to coordinators and admins, at most hourly per cluster;</li>
        <li>allocation alerts at 80 % and 100 % use to coordinators and the group’s PIs, once each.</li>
      </ul>
      <p className="mt-2">An ensemble with a run that exits non-zero shows the first digest here within a few minutes.</p>
    </div>
  );
}
