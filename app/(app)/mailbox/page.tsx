import { pageIdentity, hasRole } from "@/lib/auth/page-identity";
import { ADMINS } from "@/lib/auth/roles";
import { Refusal } from "@/components/ui/refusal";
import { AreaPending } from "@/components/ui/area-pending";

export const metadata = { title: "Mailbox" };

export default async function MailboxPage() {
  const who = await pageIdentity();
  if (!hasRole(who, ADMINS)) return <Refusal what="The Mailbox" who="admins" />;
  return <AreaPending title="Mailbox" purpose="Every e-mail Ergodex sent, as the local mail server received it."
    next="Failure digests and allocation alerts will be listed here once the mail queue runs." />;
}
