// GET /api/v1/ensembles – the ensembles table: filter (state, sampler, owner, tag, q), sort, page
// POST /api/v1/ensembles – submit an ensemble spec (JSON or YAML body); 201 with the ensemble and run ids
import { withAuth } from "@/lib/auth/guard";
import { ANY, RESEARCHERS } from "@/lib/auth/roles";
import { ensembleQueryFrom, listEnsembles } from "@/lib/ensembles/list-ensembles";
import { readSpecRequest } from "@/lib/ensembles/read-spec-request";
import { submitEnsemble } from "@/lib/ensembles/submit-ensemble";

export const dynamic = "force-dynamic";

export const GET = withAuth({ roles: ANY }, async (req, { who }) =>
  Response.json(await listEnsembles(who, ensembleQueryFrom(new URL(req.url).searchParams))));

export const POST = withAuth({ roles: RESEARCHERS }, async (req, { who, audit }) => {
  const spec = await readSpecRequest(req);
  const data = await submitEnsemble(audit, who, spec);
  return Response.json({ data }, { status: 201, headers: { location: `/api/v1/ensembles/${data.ensembleId}` } });
});
