// The planner panel's call: the form's spec → POST /api/v1/planner body → the stored prediction.
import type { Prediction } from "@/lib/planner/predict";

/** Observables with estimates, per built-in sampler (series columns, then ising2d's derived ones). */
export const OBSERVABLES: Record<string, string[]> = {
  ising2d: ["e", "absM", "m2", "m4", "U4", "chi", "C"],
  oscillator: ["x2", "action", "acceptance"],
  loggas: ["sumSq", "lambdaMax"],
};

/** What the planner answered: the prediction, or the route's message with its field issues. */
export type PlanAnswer = { data: Prediction } | { error: { message: string; issues?: { path: string; message: string }[] } };

/** The request body for the spec the form describes (values typed wrong are sent as typed: the route names them). */
export function plannerBody(spec: Record<string, any>, o: { observable: string; targetError: string; pilot: string }): Record<string, unknown> {
  const target = Number(o.targetError);
  return {
    sampler: spec.sampler?.name ?? "", observable: o.observable,
    targetError: o.targetError.trim() !== "" && Number.isFinite(target) ? target : o.targetError,
    replicas: spec.replicas, fixed: spec.fixed ?? {}, scan: spec.scan ?? [], interval: spec.interval, thermalization: spec.thermalization,
    cores: spec.resources?.cores,
    ...(o.pilot.trim() ? { pilotEnsembleId: o.pilot.trim() } : {}),
  };
}

/** POST the body; never throws into the UI. */
export async function requestPlan(body: Record<string, unknown>): Promise<PlanAnswer> {
  try {
    const res = await fetch("/api/v1/planner", {
      method: "POST", credentials: "same-origin", headers: { "content-type": "application/json", accept: "application/json" }, body: JSON.stringify(body),
    });
    const json = await res.json().catch(() => null);
    if (res.ok && json?.data) return { data: json.data as Prediction };
    return { error: { message: json?.error?.message ?? `the planner answered ${res.status}`, issues: json?.error?.issues } };
  } catch (err) {
    return { error: { message: `the planner did not answer (${(err as Error).message}); try again` } };
  }
}
