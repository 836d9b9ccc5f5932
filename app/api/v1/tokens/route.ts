// GET /api/v1/tokens – the caller's API tokens (never the secret)
// POST /api/v1/tokens – create a token; the secret is in this response only
import { withAuth } from "@/lib/auth/guard";
import { readJson } from "@/lib/http/read-json";
import { createApiToken, listApiTokens } from "@/lib/auth/tokens";
import { TOKEN_OWNERS, tokenCreateSchema } from "@/lib/actions/account";

export const GET = withAuth({ roles: TOKEN_OWNERS }, async (_req, { who }) => Response.json({ data: await listApiTokens(who.userId) }));

export const POST = withAuth({ roles: TOKEN_OWNERS }, async (req, { who, audit }) => {
  const body = await readJson<{ name: string; expiresInDays?: number | null }>(req, tokenCreateSchema);
  return Response.json({ data: await createApiToken(audit, who.userId, body.name, body.expiresInDays ?? null) }, { status: 201 });
});
