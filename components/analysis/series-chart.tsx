"use client";
import { CartesianGrid, Line, LineChart, ReferenceArea, ReferenceLine, ResponsiveContainer, Tooltip, XAxis, YAxis } from "recharts";
import type { RunAnalysis } from "@/lib/hooks/use-run-analysis";
import { formatPlain } from "@/lib/format";

/** The measured series with the discarded thermalisation stretch shaded and the cut drawn. */
export function SeriesChart({ a }: { a: RunAnalysis }) {
  const data = a.series.points.map((p) => ({ i: p.i, v: p.value }));
  const cutAt = a.cut.index;
  return (
    <figure data-testid="series-chart" aria-label={`series of ${a.observable} with the thermalisation cut at ${cutAt}`}>
      <ResponsiveContainer width="100%" height={240}>
        <LineChart data={data} margin={{ top: 8, right: 16, bottom: 16, left: 8 }}>
          <CartesianGrid stroke="#e1e4e6" strokeDasharray="3 3" />
          <XAxis dataKey="i" type="number" domain={["dataMin", "dataMax"]} tick={{ fontSize: 11 }} label={{ value: "measurement", position: "insideBottom", offset: -8, fontSize: 11 }} />
          <YAxis tick={{ fontSize: 11 }} domain={["auto", "auto"]} tickFormatter={(v: number) => formatPlain(v, 4)} width={64} />
          <Tooltip formatter={(v) => formatPlain(Number(v), 8)} labelFormatter={(l) => `measurement ${l}`} />
          {cutAt > 0 ? <ReferenceArea x1={0} x2={cutAt} fill="#7a838e" fillOpacity={0.12} /> : null}
          <ReferenceLine x={cutAt} stroke="#D55E00" strokeWidth={2} label={{ value: `cut ${cutAt}`, position: "insideTopRight", fontSize: 11, fill: "#D55E00" }} />
          <Line dataKey="v" dot={false} stroke="#0072B2" strokeWidth={1} isAnimationActive={false} name={a.observable} />
        </LineChart>
      </ResponsiveContainer>
      <figcaption className="text-xs text-ink-faint">
        {a.series.stride > 1 ? `Shown: every ${a.series.stride}th of ${a.series.total.toLocaleString("en-GB")} measurements (${a.series.shown.toLocaleString("en-GB")} points); the estimate uses all of them. ` : `${a.series.total.toLocaleString("en-GB")} measurements. `}
        Shaded: discarded as thermalisation ({a.cut.rule}).
      </figcaption>
    </figure>
  );
}
