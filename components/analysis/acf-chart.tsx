"use client";
import { CartesianGrid, Legend, Line, LineChart, ReferenceLine, ResponsiveContainer, Tooltip, XAxis, YAxis } from "recharts";
import type { RunAnalysis } from "@/lib/hooks/use-run-analysis";
import { formatPlain } from "@/lib/format";

// fixed ticks: the default ones on [-0.2, 1] come out as long binary fractions (0.6000000001)
const RHO_TICKS = [-0.2, 0, 0.2, 0.4, 0.6, 0.8, 1];

/** Normalised autocorrelation ρ(t) and τ_int(W) against the lag, with the chosen window W marked. */
export function AcfChart({ a }: { a: RunAnalysis }) {
  const data = a.acf.rho.map((rho, t) => ({ t, rho, tau: a.acf.tauIntByWindow[t] }));
  const W = a.acf.window;
  return (
    <figure data-testid="acf-chart" aria-label={`normalised autocorrelation with window ${W}`}>
      <ResponsiveContainer width="100%" height={220}>
        <LineChart data={data} margin={{ top: 8, right: 16, bottom: 16, left: 8 }}>
          <CartesianGrid stroke="#e1e4e6" strokeDasharray="3 3" />
          <XAxis dataKey="t" type="number" tick={{ fontSize: 11 }} label={{ value: "lag t", position: "insideBottom", offset: -8, fontSize: 11 }} />
          <YAxis yAxisId="rho" tick={{ fontSize: 11 }} domain={[-0.2, 1]} ticks={RHO_TICKS} tickFormatter={(v: number) => formatPlain(v, 2)} width={44} />
          <YAxis yAxisId="tau" orientation="right" tick={{ fontSize: 11 }} tickFormatter={(v: number) => formatPlain(v, 3)} width={44} />
          <Tooltip formatter={(v) => formatPlain(Number(v), 5)} labelFormatter={(l) => `lag ${l}`} />
          <Legend verticalAlign="top" height={20} wrapperStyle={{ fontSize: 11 }} />
          <ReferenceLine yAxisId="rho" y={0} stroke="#c9ced3" />
          <ReferenceLine yAxisId="rho" x={W} stroke="#D55E00" strokeWidth={2} label={{ value: `W = ${W}`, position: "insideTopRight", fontSize: 11, fill: "#D55E00" }} />
          <Line yAxisId="rho" dataKey="rho" name="ρ(t)" dot={false} stroke="#0072B2" isAnimationActive={false} />
          {<Line yAxisId="tau" dataKey="tau" name="τ_int(W)" dot={false} stroke="#009E73" strokeDasharray="4 2" isAnimationActive={false} />}
        </LineChart>
      </ResponsiveContainer>
    </figure>
  );
}
