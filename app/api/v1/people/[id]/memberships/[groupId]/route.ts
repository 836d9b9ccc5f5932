// PUT /api/v1/people/:id/memberships/:groupId – add to a group or change the lead flag (admins)
// DELETE /api/v1/people/:id/memberships/:groupId – remove from a group (admins)
import { withAuth } from "@/lib/auth/guard";
import { ADMINS } from "@/lib/auth/roles";
import { readJson } from "@/lib/http/read-json";
import { uuidParam } from "@/lib/http/params";
import { setMembership } from "@/lib/people/manage-people";
import { membershipSchema } from "@/lib/actions/people";

type P = { id: string; groupId: string };

export const PUT = withAuth<P>({ roles: ADMINS }, async (req, { audit, params }) => {
  const body = await readJson<{ member: boolean; isLead?: boolean }>(req, membershipSchema);
  return Response.json({ data: await setMembership(audit, uuidParam(params.id, "person"), uuidParam(params.groupId, "group"), body) });
});

export const DELETE = withAuth<P>({ roles: ADMINS }, async (_req, { audit, params }) =>
  Response.json({ data: await setMembership(audit, uuidParam(params.id, "person"), uuidParam(params.groupId, "group"), { member: false }) }),
);
