// From the measured points and a request to a plan: measurements, sweeps, core-hours, assumptions, warnings.
import { AppError } from "@/lib/errors";
import { CONVENTIONS, errorAfter, measurementsForTarget } from "./formula";
import { describeParams, locate, type Located } from "./interpolate";
import type { MeasuredPoint, Plan, PlanRequest, PointPlan } from "./types";

/** Gamma-method rule of thumb: fewer than 100·tau_int measurements give unreliable errors (common practice). */
const FEW = 100;

/**
 * The plan for `req` from `measured` (the pilot chains grouped by point). Every requested point
 * needs a measured point that agrees with it in all parameters but at most one numeric one (see
 * locate). tau_int is converted from sweeps to the plan's measurement interval as
 * max(½, tau_sweeps / interval), exact when the interval is the pilots' and a fair approximation
 * when both are well below tau_sweeps. The spec has one measurement count for all points: the
 * largest need, plus the measurements the pilots' thermalisation cut discarded (converted to the
 * plan's interval), so that N measurements remain after the new runs' cut.
 */
export function planFromMeasured(req: PlanRequest, measured: MeasuredPoint[], pilotIntervals: number[], pilotThermalizations: number[]): Plan {
  if (!req.points.length) throw new AppError("invalid", "the plan needs at least one parameter point");
  const interval = req.interval ?? Math.max(...pilotIntervals, 1);
  const thermalization = req.thermalization ?? Math.max(0, ...pilotThermalizations);
  const cores = req.cores ?? 1;
  const wallMargin = req.wallMargin ?? 1.5;
  const warnings: string[] = [];
  const assumptions: string[] = [];

  const located: Located[] = [];
  const missing: string[] = [];
  for (const p of req.points) {
    const l = locate(p, measured);
    if (l) located.push(l); else missing.push(describeParams(p));
  }
  if (missing.length) {
    const have = measured.map((m) => describeParams(m.params)).slice(0, 8).join("; ") || "none";
    throw new AppError("invalid", `no earlier estimates of ${req.sampler}/${req.observable} agree with ${missing.slice(0, 5).join("; ")}${missing.length > 5 ? ` (+${missing.length - 5} more)` : ""} in all parameters but one numeric one; measured points: ${have}. Run a pilot there first.`);
  }

  const tauAt = (l: Located) => Math.max(0.5, l.stats.tauSweeps / interval);
  const needs = located.map((l) => measurementsForTarget({ tauInt: tauAt(l), variance: l.stats.variance, targetError: req.targetError, replicas: req.replicas }));
  const cutAllowance = Math.ceil(Math.max(...located.map((l) => l.stats.cutSweeps)) / interval);
  const measurements = Math.max(...needs) + cutAllowance;
  const sweepsPerReplica = thermalization + measurements * interval;

  const points: PointPlan[] = located.map((l, i) => {
    const tauInt = tauAt(l);
    const predictedError = errorAfter({ tauInt, variance: l.stats.variance, replicas: req.replicas, measurements: measurements - cutAllowance });
    const secondsPerRun = l.stats.secondsPerSweep === null ? null : l.stats.overheadSeconds + l.stats.secondsPerSweep * sweepsPerReplica;
    return {
      params: req.points[i], derivation: l.derivation, tauInt, variance: l.stats.variance, measurementsNeeded: needs[i],
      relUncertainty: l.stats.relUncertainty, predictedError, predictedErrorUncertainty: (predictedError * l.stats.relUncertainty) / 2,
      secondsPerSweep: l.stats.secondsPerSweep, secondsPerRun,
      coreHours: secondsPerRun === null ? null : (req.replicas * cores * secondsPerRun) / 3600,
      estimateIds: l.sources.flatMap((s) => s.chains.map((c) => c.estimateId)),
    };
  });

  for (const l of located) warnings.push(...l.warnings);
  const few = located.filter((l) => l.stats.minN < FEW * (l.stats.tauSweeps / Math.max(...pilotIntervals, 1)));
  if (few.length) warnings.push(`few measurements: a pilot chain has fewer than ${FEW}·tau_int measurements at ${few.length} point(s), so its tau_int and variance are themselves uncertain (common practice)`);
  const single = located.filter((l) => l.stats.chains < 2);
  if (single.length) warnings.push(`${single.length} point(s) rest on a single pilot chain: the spread between chains could not be checked`);
  if (req.interval !== undefined && pilotIntervals.some((v) => v !== req.interval)) {
    warnings.push(`the plan's interval (${req.interval}) differs from the pilots' (${[...new Set(pilotIntervals)].join(", ")}): tau_int was converted as tau_sweeps / interval, which holds only while both intervals are well below tau_int in sweeps`);
  }
  if (cutAllowance > 0) warnings.push(`thermalisation added: ${cutAllowance} measurements on top of the need, because the pilots' MSER-5 cut discarded that many (${thermalization} thermalisation sweeps kept from ${req.thermalization === undefined ? "the pilots" : "the request"})`);
  const spread = Math.max(...needs) / Math.min(...needs);
  if (spread > 2) warnings.push(`the points need very different lengths (factor ${spread.toFixed(1)}): every point gets the largest, so most reach a smaller error than the target`);

  const timed = points.every((p) => p.secondsPerRun !== null);
  if (!timed) warnings.push("no run times recorded for some pilot points: core-hours cannot be priced there");
  assumptions.push(
    "run time = wall seconds between a run's start and end (as the scheduler reported and the ledger charged), thermalisation included: a straight line overhead + seconds per sweep × sweeps where the chains at a point ran lengths ≥ 1.5× apart, else the median of wall ÷ sweeps — start-up then spread over the sweeps, so a short pilot overstates the cost of a long run",
    "the run time scales linearly with sweeps and does not depend on the cores per run (the built-in samplers are single-threaded)",
    `replicas are independent and combined by inverse variance: each contributes measurements ÷ 2·tau_int independent samples`,
    `the suggested wall time is ${wallMargin}× the slowest point's expected run time (common practice), rounded up to whole minutes`,
  );
  const runs = req.replicas * req.points.length;
  const slowest = timed ? Math.max(...points.map((p) => p.secondsPerRun!)) : null;
  const wallMinutes = slowest === null ? null : Math.max(1, Math.ceil((wallMargin * slowest) / 60));
  return {
    request: { ...req, interval, thermalization, cores, wallMargin },
    points, measurements, cutAllowance, sweepsPerReplica, runs,
    coreHours: timed ? points.reduce((a, p) => a + p.coreHours!, 0) : null,
    wallMinutes, reservationCoreHours: wallMinutes === null ? null : (runs * cores * wallMinutes) / 60,
    conventions: CONVENTIONS, assumptions, warnings,
  };
}
