// Burn chart and burn rate from daily charges (lib/allocations/burn.ts): exact arithmetic on small
// invented ledgers, so every figure is checked against a hand computation written beside it.
import { describe, expect, it } from "vitest";
import { burnChart, burnRate, DAY_MS } from "@/lib/allocations/burn";

const start = new Date("2026-01-01T00:00:00Z");
const end = new Date("2026-01-11T00:00:00Z"); // 10 days
const now = new Date("2026-01-06T00:00:00Z"); // day 5, midnight

describe("burnChart", () => {
  it("cumulates charges up to today, draws the straight line 0 → given over the whole period", () => {
    const pts = burnChart([{ day: "2026-01-02", coreHours: 10 }, { day: "2026-01-05", coreHours: 5 }], 100, start, end, now);
    expect(pts).toHaveLength(10);
    expect(pts.map((p) => p.charged)).toEqual([0, 10, 10, 10, 15, 15, null, null, null, null]);
    // the line at the end of day i is 100 × (i + 1) / 10
    expect(pts.map((p) => p.line)).toEqual([10, 20, 30, 40, 50, 60, 70, 80, 90, 100]);
  });

  it("thins a long period to at most about 400 points but keeps today and the last day", () => {
    const long = burnChart([], 1000, new Date("2020-01-01Z"), new Date("2030-01-01Z"), new Date("2025-06-15T12:00:00Z"));
    expect(long.length).toBeLessThanOrEqual(402);
    expect(long.at(-1)!.day).toBe("2029-12-31");
    expect(long.at(-1)!.line).toBe(1000);
    expect(long.some((p) => p.day === "2025-06-15")).toBe(true);
  });

  it("refuses an inverted period", () => {
    expect(() => burnChart([], 1, end, start, now)).toThrow(/ends .* before it starts/);
  });
});

describe("burnRate", () => {
  it("averages the window since the start when the period is younger than 14 days, and projects the run-out", () => {
    // 15 core-hours over 5 elapsed days = 3/day; 40 free → 40 / 3 = 13.33 days after now → 2026-01-19, after the end
    const b = burnRate([{ day: "2026-01-02", coreHours: 10 }, { day: "2026-01-05", coreHours: 5 }], 100, 15, 40, start, end, now);
    expect(b).toMatchObject({ ratePerDay: 3, windowDays: 5, linePerDay: 10, runOut: "2026-01-19", runsOutEarly: false, elapsed: 0.5, chargedShare: 0.15 });
  });

  it("uses only the trailing 14 days once the period is older, and flags a run-out before the end", () => {
    const s = new Date("2026-01-01Z");
    const e = new Date("2026-12-31Z");
    const n = new Date("2026-03-01T00:00:00Z");
    const daily = [{ day: "2026-01-10", coreHours: 1000 }, { day: "2026-02-20", coreHours: 140 }, { day: "2026-02-28", coreHours: 70 }];
    // window: 2026-02-15 00:00 → 2026-03-01 00:00 = 14 days, 210 core-hours → 15/day; 300 free → 20 days → 2026-03-21
    const b = burnRate(daily, 5000, 1210, 300, s, e, n);
    expect(b).toMatchObject({ ratePerDay: 15, windowDays: 14, runOut: "2026-03-21", runsOutEarly: true });
  });

  it("gives no run-out without charges, and a clear error for a non-finite figure", () => {
    expect(burnRate([], 100, 0, 100, start, end, now)).toMatchObject({ ratePerDay: 0, runOut: null, runsOutEarly: false });
    expect(() => burnRate([], Number.NaN, 0, 100, start, end, now)).toThrow(/given NaN/);
    expect(DAY_MS).toBe(86_400_000);
  });
});
