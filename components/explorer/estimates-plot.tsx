"use client";
import { CartesianGrid, ErrorBar, Legend, ResponsiveContainer, Scatter, ScatterChart, Tooltip, XAxis, YAxis } from "recharts";
import type { PlotData } from "@/lib/hooks/use-explorer";
import { concise, formatPlain } from "@/lib/format";

// Okabe–Ito, colour-blind safe; lines also differ by marker shape so colour is never the only cue
const COLOURS = ["#0072B2", "#D55E00", "#009E73", "#CC79A7", "#E69F00", "#56B4E9", "#000000", "#F0E442"];
const SHAPES = ["circle", "square", "triangle", "diamond", "cross", "star", "wye"] as const;

type Datum = { x: number; mean: number; error: number; tau: number | null };

/** The observable against the chosen parameter, one line per group, with error bars; optional per-replica points. */
export function EstimatesPlot({ data, observable, x, logX, logY, replicas }: { data: PlotData; observable: string; x: string; logX: boolean; logY: boolean; replicas: boolean }) {
  // a log axis cannot show zero or negative values: such points are left out and counted below
  const ok = (d: { x: number; mean: number }) => (!logX || d.x > 0) && (!logY || d.mean > 0);
  let hidden = 0;
  const lines = data.series.map((s) => {
    const pts: Datum[] = s.points.map((p) => ({ x: p.x, mean: p.mean, error: p.error, tau: p.tauInt })).filter((d) => ok(d) || (hidden++, false));
    const reps: Datum[] = s.points.flatMap((p) => p.runs ?? []).map((r) => ({ x: r.x, mean: r.mean, error: r.error, tau: null })).filter(ok);
    return { key: s.key, label: s.label, pts: pts.sort((a, b) => a.x - b.x), reps };
  });
  // the x axis spans the data with a margin: rounded-out bounds left empty room and put the first point on the y axis
  return (
    <figure data-testid="explorer-plot" aria-label={`${observable} against ${x}`}>
      <ResponsiveContainer width="100%" height={360}>
        <ScatterChart margin={{ top: 12, right: 24, bottom: 24, left: 12 }}>
          <CartesianGrid stroke="#e1e4e6" strokeDasharray="3 3" />
          <XAxis dataKey="x" type="number" name={x} scale={logX ? "log" : "auto"} domain={["dataMin", "dataMax"]} padding={{ left: 20, right: 20 }} tick={{ fontSize: 11 }}
            tickFormatter={(v: number) => formatPlain(v, 4)} label={{ value: `${x}${logX ? " (log)" : ""}`, position: "insideBottom", offset: -12, fontSize: 12 }} />
          <YAxis dataKey="mean" type="number" name={observable} scale={logY ? "log" : "auto"} domain={["auto", "auto"]} tick={{ fontSize: 11 }} width={72}
            tickFormatter={(v: number) => formatPlain(v, 4)} label={{ value: `${observable}${logY ? " (log)" : ""}`, angle: -90, position: "insideLeft", fontSize: 12 }} />
          <Tooltip content={<PlotTip x={x} observable={observable} />} />
          <Legend verticalAlign="top" height={28} wrapperStyle={{ fontSize: 12 }} />
          {lines.map((l, i) => (
            <Scatter key={l.key} name={l.label} data={l.pts} fill={COLOURS[i % COLOURS.length]} shape={SHAPES[i % SHAPES.length]} line={{ stroke: COLOURS[i % COLOURS.length], strokeWidth: 1.5 }} isAnimationActive={false}>
              <ErrorBar dataKey="error" direction="y" width={5} stroke={COLOURS[i % COLOURS.length]} strokeWidth={1.5} />
            </Scatter>
          ))}
          {replicas ? lines.map((l, i) => (
            <Scatter key={`${l.key}-replicas`} name={`${l.label} · replicas`} legendType="none" data={l.reps} fill="none" stroke={COLOURS[i % COLOURS.length]} shape="circle" isAnimationActive={false} opacity={0.6} />
          )) : null}
        </ScatterChart>
      </ResponsiveContainer>
      <figcaption className="text-xs text-ink-faint">
        Error bars: one standard error from the Γ method (replicas combined by inverse variance).
        {hidden ? ` ${hidden} point(s) at or below zero are not drawn on the log axis.` : ""}
        {data.truncated ? " The plot reads at most 20,000 estimates; narrow the filters to see all." : ""}
      </figcaption>
    </figure>
  );
}

function PlotTip({ active, payload, x, observable }: { active?: boolean; payload?: { payload: Datum; name?: string }[]; x: string; observable: string }) {
  if (!active || !payload?.length) return null;
  const d = payload[0].payload;
  return (
    <div className="rounded border border-line bg-paper-raised px-2 py-1 text-xs shadow">
      <div>{x} = <span className="num">{formatPlain(d.x, 6)}</span></div>
      <div>{observable} = <span className="num font-medium">{concise(d.mean, d.error)}</span>{d.tau !== null ? <> · τ_int <span className="num">{formatPlain(d.tau, 3)}</span></> : null}</div>
    </div>
  );
}
