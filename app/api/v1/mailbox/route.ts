// GET /api/v1/mailbox – what the local mail server received, newest first; ?q= searches recipient/sender/subject, ?limit=&offset= page (admins)
import { withAuth } from "@/lib/auth/guard";
import { ADMINS } from "@/lib/auth/roles";
import { AppError } from "@/lib/errors";
import { listMailbox } from "@/lib/mail/mailbox";

function intParam(url: URL, name: string): number | undefined {
  const raw = url.searchParams.get(name);
  if (raw === null || raw === "") return undefined;
  if (!/^\d+$/.test(raw)) throw new AppError("bad_request", `query parameter ${name} must be a non-negative integer, got "${raw}"`);
  return Number(raw);
}

export const GET = withAuth({ roles: ADMINS }, async (req) => {
  const url = new URL(req.url);
  const page = await listMailbox({ q: url.searchParams.get("q") ?? undefined, limit: intParam(url, "limit"), offset: intParam(url, "offset") });
  return Response.json(page);
});
