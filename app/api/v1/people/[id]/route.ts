// PATCH /api/v1/people/:id – change a person's role, name or active flag (admins)
import { withAuth } from "@/lib/auth/guard";
import { ADMINS } from "@/lib/auth/roles";
import { readJson } from "@/lib/http/read-json";
import { uuidParam } from "@/lib/http/params";
import { updatePerson, type PersonChange } from "@/lib/people/manage-people";
import { personUpdateSchema } from "@/lib/actions/people";

export const PATCH = withAuth<{ id: string }>({ roles: ADMINS }, async (req, { audit, params }) => {
  const id = uuidParam(params.id, "person");
  const body = await readJson<PersonChange>(req, personUpdateSchema);
  return Response.json({ data: await updatePerson(audit, id, body) });
});
