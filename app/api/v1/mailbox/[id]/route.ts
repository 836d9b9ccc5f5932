// GET /api/v1/mailbox/:id – one received message: envelope, headers and text (admins)
import { withAuth } from "@/lib/auth/guard";
import { ADMINS } from "@/lib/auth/roles";
import { readMailboxMessage } from "@/lib/mail/mailbox";

export const GET = withAuth<{ id: string }>({ roles: ADMINS }, async (_req, { params }) =>
  Response.json({ data: await readMailboxMessage(params.id) }));
