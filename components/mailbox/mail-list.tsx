import Link from "next/link";
import { Time } from "@/components/ui/time";
import type { StoredMailIndex } from "@/lib/mail/mail-store-server";
import { mailboxHref } from "./mailbox-href";

/** The received messages, newest first; a row opens its message beside the list. */
export function MailList({ messages, q, page, open }: { messages: StoredMailIndex[]; q: string; page: number; open?: string }) {
  return (
    <table className="data" data-testid="mailbox">
      <thead><tr><th>Received</th><th>To</th><th>Subject</th></tr></thead>
      <tbody>
        {messages.map((m) => {
          const href = mailboxHref({ q, page, open: m.id });
          const current = m.id === open;
          return (
            <tr key={m.id} className={current ? "bg-paper-sunken" : ""} aria-current={current ? "true" : undefined}>
              <td className="text-xs whitespace-nowrap num"><Time at={m.receivedAt} /></td>
              <td className="text-xs">{m.to.join(", ")}</td>
              <td><Link href={href} scroll={false} className="text-accent hover:underline">{m.subject || "(no subject)"}</Link></td>
            </tr>
          );
        })}
      </tbody>
    </table>
  );
}
