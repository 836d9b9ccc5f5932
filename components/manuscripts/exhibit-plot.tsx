"use client";
// The small plot on an exhibit's card: the snapshotted (or current) estimates against the exhibit's x parameter, with error bars.
import { CartesianGrid, ErrorBar, ResponsiveContainer, Scatter, ScatterChart, Tooltip, XAxis, YAxis } from "recharts";
import { concise, formatPlain } from "@/lib/format";
import type { PreviewSeries } from "@/lib/manuscripts/exhibit-preview";

// Okabe–Ito (the explorer's order), with marker shapes so colour is never the only cue
const COLOURS = ["#0072B2", "#D55E00", "#009E73", "#CC79A7", "#E69F00", "#56B4E9", "#000000"];
const SHAPES = ["circle", "square", "triangle", "diamond", "cross", "star", "wye"] as const;

/** A compact scatter with error bars; one line per series. */
export function ExhibitPlot({ series, x, y, label }: { series: PreviewSeries[]; x: string; y: string; label: string }) {
  return (
    <figure data-testid="exhibit-plot" aria-label={`${label}: preview against ${x}`} className="w-full">
      <ResponsiveContainer width="100%" height={180}>
        <ScatterChart margin={{ top: 8, right: 16, bottom: 18, left: 8 }}>
          <CartesianGrid stroke="#e1e4e6" strokeDasharray="3 3" />
          <XAxis dataKey="x" type="number" domain={["dataMin", "dataMax"]} padding={{ left: 12, right: 12 }} tick={{ fontSize: 10 }}
            tickFormatter={(v: number) => formatPlain(v, 4)} label={{ value: x, position: "insideBottom", offset: -8, fontSize: 11 }} />
          <YAxis dataKey="mean" type="number" domain={["auto", "auto"]} tick={{ fontSize: 10 }} width={60} tickFormatter={(v: number) => formatPlain(v, 4)}
            label={{ value: y, angle: -90, position: "insideLeft", fontSize: 11 }} />
          <Tooltip content={<Tip x={x} />} />
          {series.map((s, i) => (
            <Scatter key={s.key} name={s.label} data={s.points} fill={COLOURS[i % COLOURS.length]} shape={SHAPES[i % SHAPES.length]}
              line={{ stroke: COLOURS[i % COLOURS.length], strokeWidth: 1 }} isAnimationActive={false}>
              <ErrorBar dataKey="error" direction="y" width={4} stroke={COLOURS[i % COLOURS.length]} isAnimationActive={false} />
            </Scatter>
          ))}
        </ScatterChart>
      </ResponsiveContainer>
      {series.length > 1 ? (
        <figcaption className="flex flex-wrap gap-3 text-xxs text-ink-soft">
          {series.map((s, i) => <span key={s.key}><span aria-hidden style={{ color: COLOURS[i % COLOURS.length] }}>●</span> {s.label}</span>)}
        </figcaption>
      ) : null}
    </figure>
  );
}

function Tip({ active, payload, x }: { active?: boolean; payload?: { payload: { x: number; mean: number; error: number } }[]; x: string }) {
  if (!active || !payload?.length) return null;
  const d = payload[0].payload;
  return <div className="rounded border border-line bg-paper-raised px-2 py-1 text-xs shadow">{x} = <span className="num">{formatPlain(d.x, 6)}</span> · <span className="num">{concise(d.mean, d.error)}</span></div>;
}
