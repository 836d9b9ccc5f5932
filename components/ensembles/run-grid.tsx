import Link from "next/link";
import { STATE_BG, STATE_SHAPE, STATE_TEXT } from "@/components/ui/state-badge";
import type { GridPoint, GridRun } from "@/lib/hooks/use-ensemble";

const pct = (r: GridRun) => Math.round(100 * (r.state === "done" ? 1 : Math.max(0, Math.min(1, r.progress ?? 0))));
const fmt = (v: unknown) => (typeof v === "number" ? String(Number(v.toPrecision(6))) : String(v));

/** The parameters that differ between points: those name a row; the rest are in the spec. */
function varying(points: GridPoint[]): string[] {
  if (points.length < 2) return [];
  return Object.keys(points[0].params).filter((k) => points.some((p) => fmt(p.params[k]) !== fmt(points[0].params[k])));
}

function Cell({ r }: { r: GridRun }) {
  const p = pct(r);
  const tip = `run ${r.id} · ${r.state}${r.attempt > 1 ? ` · attempt ${r.attempt}` : ""} · ${p} %${r.failureReason ? ` · ${r.failureReason}` : ""} · seed ${r.seed}`;
  return (
    <Link href={`/runs/${r.id}`} title={tip} data-run={r.id} data-state={r.state} data-progress={p}
      className="block w-28 rounded-md border border-line bg-paper-raised px-2 py-1 hover:border-accent focus:outline-2 focus:outline-accent">
      <span className="flex items-center justify-between text-xs">
        <span><span aria-hidden className={STATE_TEXT[r.state]}>{STATE_SHAPE[r.state] ?? "·"}</span> {r.state}</span>
        <span className="num text-ink-soft">{p}%</span>
      </span>
      <span className="mt-1 block h-1.5 rounded bg-paper-sunken overflow-hidden" role="progressbar" aria-label={`run ${r.id.slice(0, 8)} progress`} aria-valuenow={p} aria-valuemin={0} aria-valuemax={100}>
        <span className={`block h-full ${STATE_BG[r.state] ?? "bg-accent"} transition-[width] duration-700`} style={{ width: `${Math.max(p, r.state === "queued" ? 0 : 3)}%` }} />
      </span>
    </Link>
  );
}

/** Points (rows) × replicas (columns), each run by state with word, shape and progress. */
export function RunGrid({ points }: { points: GridPoint[] }) {
  const keys = varying(points);
  const replicas = Math.max(0, ...points.map((p) => p.runs.length ? Math.max(...p.runs.map((r) => r.replica)) + 1 : 0));
  return (
    <div className="overflow-x-auto">
      <table className="text-sm border-separate border-spacing-1" data-testid="run-grid">
        <thead>
          <tr>
            <th className="text-left text-xs font-medium text-ink-soft px-1">{keys.length ? keys.join(", ") : "point"}</th>
            {Array.from({ length: replicas }, (_, k) => <th key={k} className="text-left text-xs font-medium text-ink-soft px-1">replica {k}</th>)}
          </tr>
        </thead>
        <tbody>
          {points.map((p) => (
            <tr key={p.id} data-point={p.index}>
              <th scope="row" className="text-left font-normal pr-3 whitespace-nowrap">
                <span className="num">{keys.length ? keys.map((k) => `${k} = ${fmt(p.params[k])}`).join(", ") : `#${p.index}`}</span>
              </th>
              {Array.from({ length: replicas }, (_, k) => {
                const r = p.runs.find((x) => x.replica === k);
                return <td key={k}>{r ? <Cell r={r} /> : null}</td>;
              })}
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
