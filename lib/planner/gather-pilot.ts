import "server-only";
// The pilot chains the planner may use: current run estimates of one observable of finished runs of
// one sampler, in the caller's groups only (or one pilot ensemble the caller may read).
import type { Identity } from "@/lib/auth/identity";
import { visibleGroupIds } from "@/lib/auth/visible-groups";
import { ensembleTarget } from "@/lib/ensembles/ensemble-target";
import { checkScope } from "@/lib/auth/scope";
import { AppError } from "@/lib/errors";
import { db } from "@/models";
import type { ParamValue } from "@/lib/spec/schema";
import type { PilotChain } from "./types";

/** Chains read per request, newest first: enough for many scans, bounded for a busy archive. */
const MAX_CHAINS = 20_000;

/** The chains plus what the plan defaults come from: the pilots' intervals and thermalisations. */
export type PilotData = { chains: PilotChain[]; intervals: number[]; thermalizations: number[] };

type Row = {
  id: string; run_id: string; ensemble_id: string; params: Record<string, ParamValue>; mean: number; error: number; tau_int: number;
  n: number; window: number | null; therm_cut: number; interval: number | null; thermalization: number | null; sweeps_total: string | number | null;
  wall_seconds: number | null; cores: number; sampler: string;
};

/**
 * Read the chains for `sampler`/`observable` that `who` may see. With `pilotEnsembleId` only that
 * ensemble (404 when it is not visible, 422 when it is of another sampler). Timing is taken only
 * from runs that finished in their first attempt: a resumed run's start time is its last attempt's.
 */
export async function gatherPilot(who: Identity, sampler: string, observable: string, pilotEnsembleId?: string): Promise<PilotData> {
  if (pilotEnsembleId) {
    const target = await ensembleTarget(pilotEnsembleId);
    if (!target) throw new AppError("not_found", "pilot ensemble not found");
    checkScope(who, target, "read");
  }
  const groups = visibleGroupIds(who);
  const rows = (await db().sequelize.query(
    `SELECT e.id, e.run_id, e.ensemble_id, e.params, e.mean, e.error, e.tau_int, e.n, e."window", e.therm_cut,
            (en.spec->>'interval')::int AS interval, (en.spec->>'thermalization')::int AS thermalization, r.sweeps_total, r.cores, s.name AS sampler,
            CASE WHEN r.attempt = 1 AND r.started_at IS NOT NULL AND r.finished_at > r.started_at
                 THEN extract(epoch FROM r.finished_at - r.started_at)::float8 END AS wall_seconds
       FROM estimates e
       JOIN runs r ON r.id = e.run_id
       JOIN ensembles en ON en.id = e.ensemble_id
       JOIN samplers s ON s.id = en.sampler_id
      WHERE e.scope = 'run' AND e.is_current AND e.observable = $1 AND r.state = 'done'
        AND e.tau_int > 0 AND e.error > 0
        AND ($2::uuid[] IS NULL OR en.group_id = ANY($2::uuid[]))
        AND ($3::uuid IS NULL OR en.id = $3::uuid)
        AND ($3::uuid IS NOT NULL OR s.name = $4)
      ORDER BY e.created_at DESC
      LIMIT ${MAX_CHAINS}`,
    { bind: [observable, groups, pilotEnsembleId ?? null, sampler], type: "SELECT" },
  )) as Row[];
  if (pilotEnsembleId && rows.some((r) => r.sampler !== sampler)) {
    throw new AppError("invalid", `the pilot ensemble ran ${rows[0].sampler}, not ${sampler}`, { issues: [{ path: "/pilotEnsembleId", message: `ran ${rows[0].sampler}, not ${sampler}` }] });
  }
  const chains: PilotChain[] = rows.map((r) => ({
    estimateId: r.id, runId: r.run_id, ensembleId: r.ensemble_id, params: r.params, mean: r.mean, error: r.error, tauInt: r.tau_int,
    n: r.n, window: r.window, thermCut: r.therm_cut, interval: r.interval ?? 1,
    sweeps: r.sweeps_total === null ? null : Number(r.sweeps_total), wallSeconds: r.wall_seconds, cores: r.cores,
  }));
  return {
    chains,
    intervals: [...new Set(rows.map((r) => r.interval ?? 1))],
    thermalizations: [...new Set(rows.map((r) => r.thermalization ?? 0))],
  };
}
