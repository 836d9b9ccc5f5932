"use client";
import { CartesianGrid, Legend, Line, LineChart, ResponsiveContainer, Tooltip, XAxis, YAxis } from "recharts";
import { useRunSpectrum } from "@/lib/hooks/use-run-analysis";
import { concise, formatPlain } from "@/lib/format";
import { Card } from "@/components/ui/card";

/** A run's Laplacian spectrum: counting function N(λ) with its Weyl fit, and the spectral dimension d_s(σ) on a log σ axis. */
export function SpectrumView({ runId }: { runId: string }) {
  const { data, error, isPending } = useRunSpectrum(runId, true);
  if (isPending) return <Card title="Spectrum"><p className="text-sm text-ink-soft">Loading the spectrum…</p></Card>;
  if (error) return <Card title="Spectrum"><p role="alert" className="text-sm text-danger">Could not load the spectrum: {error.message}</p></Card>;
  if (!data) return null;
  const { weyl } = data;
  // log axes: only positive λ, N and σ can be drawn
  const counting = data.counting.filter((p) => p.lambda > 0 && p.N > 0)
    .map((p) => ({ l: p.lambda, N: p.N, fit: weyl && p.weyl && p.lambda >= weyl.window[0] && p.lambda <= weyl.window[1] ? p.weyl : undefined }));
  const ds = data.heatKernel.filter((p) => p.sigma > 0).map((p) => ({ s: p.sigma, d: p.ds }));
  return (
    <div className="grid gap-4 lg:grid-cols-2" data-testid="spectrum">
      <Card title={weyl ? `Counting function · Weyl dimension ${concise(weyl.dimension, weyl.dimensionError)}` : "Counting function"}>
        <ResponsiveContainer width="100%" height={240}>
          <LineChart data={counting} margin={{ top: 8, right: 16, bottom: 16, left: 8 }}>
            <CartesianGrid stroke="#e1e4e6" strokeDasharray="3 3" />
            <XAxis dataKey="l" type="number" scale="log" domain={["auto", "auto"]} tick={{ fontSize: 11 }} tickFormatter={(v: number) => formatPlain(v, 2)} label={{ value: "λ", position: "insideBottom", offset: -8, fontSize: 11 }} />
            <YAxis type="number" scale="log" domain={["auto", "auto"]} tick={{ fontSize: 11 }} tickFormatter={(v: number) => formatPlain(v, 3)} width={56} />
            <Tooltip formatter={(v) => formatPlain(Number(v), 5)} labelFormatter={(l) => `λ = ${formatPlain(Number(l), 5)}`} />
            <Legend verticalAlign="top" height={20} wrapperStyle={{ fontSize: 11 }} />
            <Line dataKey="N" name="N(λ)" type="stepAfter" dot={false} stroke="#0072B2" isAnimationActive={false} />
            <Line dataKey="fit" name={weyl ? `Weyl fit, d = ${formatPlain(weyl.dimension, 4)}` : "Weyl fit"} dot={false} stroke="#D55E00" strokeWidth={2} connectNulls={false} isAnimationActive={false} />
          </LineChart>
        </ResponsiveContainer>
        {weyl ? <p className="text-xs text-ink-faint">Fitted on λ from {formatPlain(weyl.window[0], 4)} to {formatPlain(weyl.window[1], 4)} ({weyl.points} distinct eigenvalues); {weyl.zeroModes} zero mode(s) left out; {data.eigenvalues.toLocaleString("en-GB")} eigenvalues{data.shift ? `, shifted by ${formatPlain(data.shift, 4)} to be non-negative` : ""}.</p> : <p role="alert" className="text-xs text-danger">No Weyl fit: {data.weylProblem}</p>}
      </Card>
      <Card title="Spectral dimension d_s(σ)">
        <ResponsiveContainer width="100%" height={240}>
          <LineChart data={ds} margin={{ top: 8, right: 16, bottom: 16, left: 8 }}>
            <CartesianGrid stroke="#e1e4e6" strokeDasharray="3 3" />
            <XAxis dataKey="s" type="number" scale="log" domain={["auto", "auto"]} tick={{ fontSize: 11 }} tickFormatter={(v: number) => formatPlain(v, 2)} label={{ value: "σ (log)", position: "insideBottom", offset: -8, fontSize: 11 }} />
            <YAxis tick={{ fontSize: 11 }} width={44} />
            <Tooltip formatter={(v) => formatPlain(Number(v), 4)} labelFormatter={(l) => `σ = ${formatPlain(Number(l), 4)}`} />
            <Line dataKey="d" name="d_s" dot={false} stroke="#009E73" isAnimationActive={false} />
          </LineChart>
        </ResponsiveContainer>
        <p className="text-xs text-ink-faint">From the heat-kernel trace K(σ) = Σ e^(−σλ); at large σ it falls to 0 in a finite volume.</p>
      </Card>
    </div>
  );
}
