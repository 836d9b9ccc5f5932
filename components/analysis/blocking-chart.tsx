"use client";
import { CartesianGrid, ErrorBar, Line, LineChart, ReferenceLine, ResponsiveContainer, Tooltip, XAxis, YAxis } from "recharts";
import type { RunAnalysis } from "@/lib/hooks/use-run-analysis";
import { formatPlain } from "@/lib/format";

/** The blocking curve: naive error of the mean against the blocking level, its plateau marked. */
export function BlockingChart({ a }: { a: RunAnalysis }) {
  if (!a.blocking) return <p className="text-sm text-ink-soft">No blocking curve: {a.blockingProblem ?? "too few points after the cut"}.</p>;
  const data = a.blocking.levels.map((l) => ({ level: l.level, error: l.error, eoe: l.errorOfError, blocks: l.nBlocks }));
  return (
    <figure data-testid="blocking-chart" aria-label="blocking curve">
      <ResponsiveContainer width="100%" height={220}>
        <LineChart data={data} margin={{ top: 8, right: 16, bottom: 16, left: 8 }}>
          <CartesianGrid stroke="#e1e4e6" strokeDasharray="3 3" />
          <XAxis dataKey="level" type="number" domain={["dataMin", "dataMax"]} allowDecimals={false} tick={{ fontSize: 11 }} label={{ value: "blocking level (block = 2^level)", position: "insideBottom", offset: -8, fontSize: 11 }} />
          <YAxis tick={{ fontSize: 11 }} tickFormatter={(v: number) => formatPlain(v, 3)} width={64} />
          <Tooltip formatter={(v) => formatPlain(Number(v), 5)} labelFormatter={(l) => `level ${l}`} />
          <ReferenceLine y={a.estimate.error} stroke="#009E73" strokeDasharray="4 2" label={{ value: "Γ-method error", position: "insideTopLeft", fontSize: 11, fill: "#009E73" }} />
          {a.blocking.plateauFound ? <ReferenceLine x={a.blocking.plateau.level} stroke="#D55E00" label={{ value: "plateau", position: "insideTopRight", fontSize: 11, fill: "#D55E00" }} /> : null}
          <Line dataKey="error" name="error" stroke="#0072B2" isAnimationActive={false}>
            <ErrorBar dataKey="eoe" width={4} stroke="#0072B2" />
          </Line>
        </LineChart>
      </ResponsiveContainer>
    </figure>
  );
}
