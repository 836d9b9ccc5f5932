// Burn rate and run-out of an allocation, from its charges over time. Pure functions (no database):
// lib/allocations/usage.ts feeds them the ledger's daily charge sums.
//
// The "straight line" is even spending: what was given, spread linearly over the period.
// The burn rate is the mean charge per day over the trailing BURN_WINDOW_DAYS (or since the start
// of the period if that is shorter): a design choice, two weeks smooth the weekly rhythm of
// submissions without hiding a change of pace. Run-out = now + free / rate, when the rate is positive.

export const DAY_MS = 86_400_000;
/** Days the burn rate averages over. */
export const BURN_WINDOW_DAYS = 14;

/** Core-hours charged on one UTC day. */
export type DailyCharge = { day: string; coreHours: number };
/** One point of the chart: cumulative charge (null after today) and the straight line. */
export type BurnPoint = { day: string; charged: number | null; line: number };

export type Burn = {
  /** Core-hours per day over the trailing window. */
  ratePerDay: number;
  windowDays: number;
  /** What even spending would charge per day. */
  linePerDay: number;
  /** The day (ISO date) the free hours run out at ratePerDay; null if the rate is zero. */
  runOut: string | null;
  /** True when runOut falls before the end of the period. */
  runsOutEarly: boolean;
  /** Fraction of the period elapsed and fraction of what was given charged. */
  elapsed: number;
  chargedShare: number;
};

const isoDay = (t: number) => new Date(t).toISOString().slice(0, 10);
const dayStart = (d: Date) => Date.UTC(d.getUTCFullYear(), d.getUTCMonth(), d.getUTCDate());
const round4 = (x: number) => Math.round(x * 1e4) / 1e4;

function checkDates(start: Date, end: Date, now: Date): void {
  for (const [k, d] of [["start", start], ["end", end], ["now", now]] as const) {
    if (!(d instanceof Date) || Number.isNaN(d.getTime())) throw new Error(`burn: ${k} is not a valid date`);
  }
  if (end <= start) throw new Error(`burn: the period ends (${end.toISOString()}) before it starts (${start.toISOString()})`);
}

/**
 * Daily points from the period's first to its last day: cumulative charges up to `now`'s day,
 * the straight line 0 → given throughout. Long periods are thinned to every `step` days (≤ ~400 points).
 */
export function burnChart(daily: DailyCharge[], given: number, start: Date, end: Date, now: Date): BurnPoint[] {
  checkDates(start, end, now);
  const byDay = new Map(daily.map((d) => [d.day, d.coreHours]));
  const first = dayStart(start);
  const last = dayStart(new Date(end.getTime() - 1));
  const today = dayStart(now);
  const days = Math.round((last - first) / DAY_MS) + 1;
  const step = Math.max(1, Math.ceil(days / 400));
  const span = end.getTime() - start.getTime();
  let cum = 0;
  for (const d of daily) if (Date.parse(`${d.day}T00:00:00Z`) < first) cum += d.coreHours; // charges before the period (rare: backdated grants)
  const out: BurnPoint[] = [];
  for (let i = 0; i < days; i++) {
    const t = first + i * DAY_MS;
    cum += byDay.get(isoDay(t)) ?? 0;
    if (i % step !== 0 && i !== days - 1 && t !== today) continue;
    const endOfDay = Math.min(t + DAY_MS, end.getTime());
    const line = round4(Math.max(0, given) * Math.min(1, Math.max(0, (endOfDay - start.getTime()) / span)));
    out.push({ day: isoDay(t), charged: t <= today ? round4(cum) : null, line });
  }
  return out;
}

/** Burn rate, straight-line rate and run-out (see the top of this file). */
export function burnRate(daily: DailyCharge[], given: number, charged: number, free: number, start: Date, end: Date, now: Date): Burn {
  checkDates(start, end, now);
  if (![given, charged, free].every(Number.isFinite)) throw new Error(`burn: given ${given}, charged ${charged}, free ${free} must be finite numbers`);
  const span = end.getTime() - start.getTime();
  // Whole UTC days: the window starts at the beginning of the day BURN_WINDOW_DAYS before now (or of the period's first day).
  const fromDay = dayStart(new Date(Math.max(start.getTime(), now.getTime() - BURN_WINDOW_DAYS * DAY_MS)));
  const windowDays = Math.max(0, Math.min(now.getTime(), end.getTime()) - fromDay) / DAY_MS;
  const inWindow = daily.filter((d) => Date.parse(`${d.day}T00:00:00Z`) >= fromDay).reduce((s, d) => s + d.coreHours, 0);
  const ratePerDay = windowDays > 0 ? inWindow / Math.max(windowDays, 1) : 0;
  const runOutAt = ratePerDay > 0 ? now.getTime() + (Math.max(0, free) / ratePerDay) * DAY_MS : null;
  return {
    ratePerDay: round4(ratePerDay),
    windowDays: round4(windowDays),
    linePerDay: round4(Math.max(0, given) / (span / DAY_MS)),
    runOut: runOutAt === null ? null : isoDay(runOutAt),
    runsOutEarly: runOutAt !== null && runOutAt < end.getTime(),
    elapsed: round4(Math.min(1, Math.max(0, (now.getTime() - start.getTime()) / span))),
    chargedShare: given > 0 ? round4(charged / given) : 0,
  };
}
