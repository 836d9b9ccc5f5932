import Link from "next/link";
import { pageIdentity, hasRole } from "@/lib/auth/page-identity";
import { ADMINS } from "@/lib/auth/roles";
import { env } from "@/lib/env";
import { AppError } from "@/lib/errors";
import { listMailbox, readMailboxMessage, type MailboxMessage } from "@/lib/mail/mailbox";
import { PageHeader } from "@/components/ui/page-header";
import { Refusal } from "@/components/ui/refusal";
import { MailSearch } from "@/components/mailbox/mail-search";
import { MailList } from "@/components/mailbox/mail-list";
import { MailView } from "@/components/mailbox/mail-view";
import { MailboxEmpty } from "@/components/mailbox/mailbox-empty";
import { mailboxHref } from "@/components/mailbox/mailbox-href";

export const metadata = { title: "Mailbox" };
export const dynamic = "force-dynamic";

const PAGE_SIZE = 50;
type Search = Promise<Record<string, string | string[] | undefined>>;
const one = (v: string | string[] | undefined) => (Array.isArray(v) ? v[0] : v) ?? "";

export default async function MailboxPage({ searchParams }: { searchParams: Search }) {
  const who = await pageIdentity();
  if (!hasRole(who, ADMINS)) return <Refusal what="The Mailbox" who="admins" />;
  const sp = await searchParams;
  const q = one(sp.q).slice(0, 200);
  const page = Math.max(1, Math.floor(Number(one(sp.page)) || 1));
  const open = one(sp.open) || undefined;
  const { data, total } = await listMailbox({ q, limit: PAGE_SIZE, offset: (page - 1) * PAGE_SIZE });
  let message: MailboxMessage | null = null;
  let missing = false;
  if (open) {
    try { message = await readMailboxMessage(open); } catch (err) {
      if (!(err instanceof AppError && err.code === "not_found")) throw err;
      missing = true;
    }
  }
  const pages = Math.max(1, Math.ceil(total / PAGE_SIZE));
  return (
    <>
      <PageHeader title="Mailbox" purpose="Every e-mail Ergodex sent, as the local mail server received it." />
      <MailSearch q={q} />
      {total === 0 ? <MailboxEmpty q={q} server={`127.0.0.1:${env.smtp.port}`} /> : (
        <div className="grid gap-4 lg:grid-cols-[minmax(0,1.15fr)_minmax(0,1fr)] items-start">
          <div>
            <MailList messages={data} q={q} page={page} open={open} />
            <nav aria-label="Pages" className="flex items-center justify-between pt-3 text-sm text-ink-soft">
              <span className="num">{total.toLocaleString("en-GB")} message{total === 1 ? "" : "s"}{q ? ` matching “${q}”` : ""}</span>
              {pages > 1 ? (
                <span className="flex items-center gap-3 num">
                  {page > 1 ? <Link href={mailboxHref({ q, page: page - 1 })} className="text-accent">‹ newer</Link> : null}
                  page {page} of {pages}
                  {page < pages ? <Link href={mailboxHref({ q, page: page + 1 })} className="text-accent">older ›</Link> : null}
                </span>
              ) : null}
            </nav>
          </div>
          <div>
            {message ? <MailView message={message} /> : missing
              ? <p role="alert" className="text-sm text-danger">That message is no longer in the mailbox.</p>
              : <p className="text-sm text-ink-soft">Choose a message to read it.</p>}
          </div>
        </div>
      )}
    </>
  );
}
