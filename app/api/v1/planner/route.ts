// POST /api/v1/planner – predict the measurements, sweeps and core-hours an ensemble needs for a target error, from visible estimates
import { withAuth } from "@/lib/auth/guard";
import { readJson } from "@/lib/http/read-json";
import { predictEnsemble } from "@/lib/planner/predict";
import { plannerBodySchema, type PlannerBody } from "@/lib/planner/request";

export const dynamic = "force-dynamic";

// Those who submit ensembles plan them; coordinators price requests for their allocations.
const PLANNERS = ["researcher", "pi", "coordinator", "admin"] as const;

export const POST = withAuth({ roles: PLANNERS }, async (req, { who }) =>
  Response.json({ data: await predictEnsemble(who, await readJson<PlannerBody>(req, plannerBodySchema)) }, { status: 201 }));
