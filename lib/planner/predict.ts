import "server-only";
// POST /api/v1/planner's lib function: gather the pilots, plan, store the prediction, answer with it.
import type { Identity } from "@/lib/auth/identity";
import { AppError } from "@/lib/errors";
import { db } from "@/models";
import { chainVariance } from "./formula";
import { gatherPilot } from "./gather-pilot";
import { measuredPoints } from "./measured-points";
import { planFromMeasured } from "./plan";
import { planTag } from "./plan-tag";
import { toPlanRequest, type PlannerBody } from "./request";
import type { Plan } from "./types";

/** One pilot estimate the prediction rests on, with the values the planner took from it. */
export type PlanInput = {
  estimateId: string; runId: string; ensembleId: string; params: Record<string, unknown>;
  tauInt: number; variance: number; error: number; n: number; interval: number; thermCut: number; secondsPerSweep: number | null;
};

/** A stored prediction: the plan, its id, the spec tag that links an ensemble to it, and its inputs. */
export type Prediction = Plan & { id: string; tag: string; createdAt: string; pilotEnsembleId: string | null; inputs: PlanInput[] };

/**
 * Predict what an ensemble needs to reach `targetError` on `observable` at each requested point,
 * from the estimates `who` may see (or of one pilot ensemble), and store the prediction so that
 * an ensemble carrying its tag can be compared with it once done.
 */
export async function predictEnsemble(who: Identity, body: PlannerBody): Promise<Prediction> {
  const req = toPlanRequest(body);
  const pilot = await gatherPilot(who, req.sampler, req.observable, body.pilotEnsembleId);
  if (!pilot.chains.length) {
    const where = body.pilotEnsembleId ? `the pilot ensemble ${body.pilotEnsembleId}` : `finished ${req.sampler} runs of your groups`;
    throw new AppError("invalid", `no estimates of ${req.observable} in ${where}: run a short pilot ensemble first`, { issues: [{ path: "/observable", message: `no estimates in ${where}` }] });
  }
  const plan = planFromMeasured(req, measuredPoints(pilot.chains), pilot.intervals, pilot.thermalizations);
  const used = new Set(plan.points.flatMap((p) => p.estimateIds));
  const inputs: PlanInput[] = pilot.chains.filter((c) => used.has(c.estimateId)).map((c) => ({
    estimateId: c.estimateId, runId: c.runId, ensembleId: c.ensembleId, params: c.params, tauInt: c.tauInt, variance: chainVariance(c),
    error: c.error, n: c.n, interval: c.interval, thermCut: c.thermCut,
    secondsPerSweep: c.wallSeconds !== null && c.sweeps ? c.wallSeconds / c.sweeps : null,
  }));
  const row = await db().PlannerPrediction.create({
    userId: who.userId, sampler: req.sampler, observable: req.observable, targetError: req.targetError, replicas: req.replicas,
    measurements: plan.measurements, interval: plan.request.interval, coreHours: plan.coreHours, pilotEnsembleId: body.pilotEnsembleId ?? null,
    request: body as unknown as Record<string, unknown>, plan: { ...plan, inputs } as unknown as Record<string, unknown>,
  });
  const id = row.id;
  return { ...plan, id, tag: planTag(id), createdAt: row.createdAt.toISOString(), pilotEnsembleId: body.pilotEnsembleId ?? null, inputs };
}
