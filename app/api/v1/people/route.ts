// GET /api/v1/people – everyone, with roles and groups (admins)
// POST /api/v1/people – create a person (admins)
import { withAuth } from "@/lib/auth/guard";
import { ADMINS } from "@/lib/auth/roles";
import { readJson } from "@/lib/http/read-json";
import { createPerson, listPeople, type NewPerson } from "@/lib/people/manage-people";
import { personCreateSchema } from "@/lib/actions/people";

export const GET = withAuth({ roles: ADMINS }, async () => Response.json({ data: await listPeople() }));

export const POST = withAuth({ roles: ADMINS }, async (req, { audit }) => {
  const body = await readJson<NewPerson>(req, personCreateSchema);
  return Response.json({ data: await createPerson(audit, body) }, { status: 201 });
});
