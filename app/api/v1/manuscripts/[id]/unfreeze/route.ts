// POST /api/v1/manuscripts/:id/unfreeze – { reason }: release the snapshots (only a PI leading the group; recorded in the audit log)
import { withAuth } from "@/lib/auth/guard";
import { readJson } from "@/lib/http/read-json";
import { manuscriptTarget } from "@/lib/manuscripts/access";
import { unfreezeManuscript } from "@/lib/manuscripts/freeze-manuscript";

export const dynamic = "force-dynamic";

const schema = { type: "object", additionalProperties: false, required: ["reason"], properties: { reason: { type: "string", minLength: 1, maxLength: 2000 } } } as const;

export const POST = withAuth<{ id: string }>({ roles: ["pi"], target: (p) => manuscriptTarget(p.id), access: "read" }, async (req, { who, audit, params }) => {
  const { reason } = await readJson<{ reason: string }>(req, schema);
  const ms = await unfreezeManuscript(audit, who, params.id, reason);
  return Response.json({ data: { id: ms.id, state: ms.state } });
});
