import { Card } from "@/components/ui/card";
import { Time } from "@/components/ui/time";
import type { MailboxMessage } from "@/lib/mail/mailbox";

const URL_PATTERN = /(https?:\/\/[^\s<>"]+)/g;

/** Plain text with its web addresses as links (the digests point at ensembles and runs). */
function LinkedText({ text }: { text: string }) {
  const parts = text.split(URL_PATTERN);
  return <>{parts.map((part, i) => (i % 2 === 1 ? <a key={i} href={part} className="text-accent underline">{part}</a> : part))}</>;
}

/** One opened message: its envelope, headers that matter, and the text part (HTML is not rendered). */
export function MailView({ message }: { message: MailboxMessage }) {
  const rows: [string, React.ReactNode][] = [
    ["From", message.headerFrom || message.from],
    ["To", message.headerTo || message.to.join(", ")],
    ["Received", <Time key="t" at={message.receivedAt} />],
    ["Kind", message.headers["x-ergodex-kind"] ?? "—"],
    ["Message-ID", <span key="id" className="mono">{message.messageId ?? "—"}</span>],
  ];
  return (
    <Card>
      <h2 className="font-semibold mb-2" data-testid="mail-subject">{message.subject || "(no subject)"}</h2>
      <dl className="grid grid-cols-[auto_1fr] gap-x-3 gap-y-0.5 text-xs text-ink-soft mb-3">
        {rows.map(([k, v]) => [<dt key={`${k}-k`} className="font-medium">{k}</dt>, <dd key={`${k}-v`} className="break-all">{v}</dd>])}
      </dl>
      <pre className="mono whitespace-pre-wrap break-words border-t border-line pt-3 text-ink" data-testid="mail-text"><LinkedText text={message.text} /></pre>
      {message.html ? <p className="text-xs text-ink-faint mt-2">This message also has an HTML part; only its text is shown here.</p> : null}
    </Card>
  );
}
