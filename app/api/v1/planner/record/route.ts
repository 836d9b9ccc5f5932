// GET /api/v1/planner/record – predicted vs achieved errors of ended ensembles that followed a prediction (?ensemble=<id> for one)
import { withAuth } from "@/lib/auth/guard";
import { ANY } from "@/lib/auth/roles";
import { AppError } from "@/lib/errors";
import { listPlannerRecord } from "@/lib/planner/list-record";

export const dynamic = "force-dynamic";

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

export const GET = withAuth({ roles: ANY }, async (req, { who }) => {
  const ensembleId = new URL(req.url).searchParams.get("ensemble") ?? undefined;
  if (ensembleId !== undefined && !UUID.test(ensembleId)) throw new AppError("invalid", "ensemble must be a uuid", { issues: [{ path: "/ensemble", message: "must be a uuid" }] });
  return Response.json({ data: await listPlannerRecord(who, { ensembleId }) });
});
