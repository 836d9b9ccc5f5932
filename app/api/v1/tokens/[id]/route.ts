// DELETE /api/v1/tokens/:id – revoke one of the caller's tokens
import { withAuth } from "@/lib/auth/guard";
import { revokeApiToken } from "@/lib/auth/tokens";
import { TOKEN_OWNERS } from "@/lib/actions/account";
import { uuidParam } from "@/lib/http/params";

export const DELETE = withAuth<{ id: string }>({ roles: TOKEN_OWNERS }, async (_req, { who, audit, params }) =>
  Response.json({ data: await revokeApiToken(audit, who.userId, uuidParam(params.id, "token")) }),
);
