"use client";
// Charged core-hours over time against the straight line of the period (even spending to the end).
import { CartesianGrid, Legend, Line, LineChart, ReferenceLine, ResponsiveContainer, Tooltip, XAxis, YAxis } from "recharts";
import type { BurnPoint } from "@/lib/allocations/burn";
import { coreHours } from "@/lib/format";

/** The burn chart; today is marked, future days carry only the straight line. */
export function BurnChart({ points, today, given }: { points: BurnPoint[]; today: string; given: number }) {
  if (points.length === 0) return <p className="text-sm text-ink-soft">No period to draw.</p>;
  return (
    <figure data-testid="burn-chart" aria-label="charged core-hours against the straight line of the period">
      <ResponsiveContainer width="100%" height={260}>
        <LineChart data={points} margin={{ top: 8, right: 24, bottom: 8, left: 8 }}>
          <CartesianGrid stroke="#e1e4e6" strokeDasharray="3 3" />
          <XAxis dataKey="day" tick={{ fontSize: 11 }} minTickGap={40} />
          <YAxis tick={{ fontSize: 11 }} tickFormatter={(v: number) => coreHours(v)} width={72} domain={[0, Math.max(given, 1)]} allowDataOverflow={false} />
          <Tooltip formatter={(v, name) => [`${coreHours(Number(v))} core-h`, name]} />
          <Legend verticalAlign="top" height={24} wrapperStyle={{ fontSize: 12 }} />
          {points.some((p) => p.day === today) ? <ReferenceLine x={today} stroke="#7a838e" strokeDasharray="2 2" label={{ value: "today", position: "insideTopRight", fontSize: 11, fill: "#48515c" }} /> : null}
          <Line dataKey="line" name="even spending" stroke="#7a838e" strokeDasharray="6 3" dot={false} isAnimationActive={false} />
          <Line dataKey="charged" name="charged" stroke="#0f6b6b" strokeWidth={2} dot={false} connectNulls={false} isAnimationActive={false} />
        </LineChart>
      </ResponsiveContainer>
    </figure>
  );
}
