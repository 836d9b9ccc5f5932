// The readable chain: one block per activity (agent → activity → entities), each element with its facts and link.
import Link from "next/link";
import type { ChainItem, ChainStep } from "@/lib/provenance/prov-chain";
import { Time } from "@/components/ui/time";

const TIMES = new Set(["start", "end", "time", "cut chosen at"]);
const HASHES = /sha256|hash|commit|seed/;
/** Facts long enough to wrap (hashes, documents) go mono on their own line. */
function Fact({ name, value }: { name: string; value: string }) {
  const v = TIMES.has(name) && !Number.isNaN(Date.parse(value)) ? <Time at={value} /> : HASHES.test(name) ? <span className="mono break-all">{value}</span> : <span className="num">{value}</span>;
  return <li><span className="text-ink-faint">{name}</span> {v}</li>;
}

function Item({ x, what }: { x: ChainItem; what: string }) {
  const label = x.href ? <Link href={x.href} className="text-accent hover:underline" prefetch={false}>{x.label}</Link> : <span>{x.label}</span>;
  return (
    <li className="py-1" data-testid="chain-item" data-id={x.id}>
      <span className="text-xxs uppercase tracking-wide text-ink-faint mr-1">{what}{x.role ? ` (${x.role})` : ""}</span> {label}
      {x.facts.length ? <ul className="ml-4 text-xs flex flex-wrap gap-x-4 gap-y-0.5">{x.facts.map(([k, v], i) => <Fact key={i} name={k} value={v} />)}</ul> : null}
    </li>
  );
}

/** Which run's analyses, or the point combinations, a derivation belongs to (the groups of a long chain). */
function groupOf(s: ChainStep): string | null {
  if (!s.id.endsWith("/derivation")) return null;
  const series = s.used.find((u) => u.id.startsWith("series:"));
  return series ? `analyses of run ${series.id.slice("series:".length, "series:".length + 8)}` : "combinations of replicas into point estimates";
}

/** Every activity of the document in time order; in a long chain each run's analyses fold into one line that opens. */
export function ProvChainView({ steps }: { steps: ChainStep[] }) {
  if (steps.length === 0) return <p className="text-sm text-ink-soft">Nothing recorded yet: the run has not produced anything to trace.</p>;
  const fold = steps.length > 12;
  const blocks: { group: string | null; steps: ChainStep[] }[] = [];
  for (const s of steps) {
    const g = fold ? groupOf(s) : null;
    const last = blocks.at(-1);
    if (g && last?.group === g) last.steps.push(s); else blocks.push({ group: g, steps: [s] });
  }
  return (
    <ol className="space-y-3" data-testid="prov-chain">
      {blocks.map((b) => (b.group ? (
        <li key={b.steps[0].id}>
          <details className="rounded-md border border-line bg-paper-sunken/50 p-2" data-testid="chain-group">
            <summary className="cursor-pointer text-sm"><span className="font-medium">{b.steps.length} {b.group}</span> <span className="text-ink-soft">— {b.steps.map((s) => s.generated[0]?.label.split(" = ")[0]).filter(Boolean).join(", ")}</span></summary>
            <ol className="space-y-3 mt-2">{b.steps.map((s) => <Step key={s.id} s={s} />)}</ol>
          </details>
        </li>
      ) : b.steps.map((s) => <Step key={s.id} s={s} />)))}
    </ol>
  );
}

function Step({ s }: { s: ChainStep }) {
  return (
    <li className="rounded-md border border-line bg-paper-raised p-3" data-testid="chain-step" data-id={s.id}>
      <div className="flex flex-wrap items-baseline gap-2">
        <span className="text-xxs uppercase tracking-wide rounded bg-accent-soft text-accent-strong px-1.5">activity</span>
        {s.href ? <Link href={s.href} className="font-medium text-accent hover:underline" prefetch={false}>{s.label}</Link> : <span className="font-medium">{s.label}</span>}
        <span className="mono text-xs text-ink-faint">{s.type}</span>
      </div>
      {s.facts.length ? <ul className="text-xs flex flex-wrap gap-x-4 gap-y-0.5 mt-1">{s.facts.map(([k, v], i) => <Fact key={i} name={k} value={v} />)}</ul> : null}
      <div className="grid md:grid-cols-3 gap-3 mt-2 text-sm">
        <ul><li className="text-xs font-medium text-ink-soft">who</li>{s.agents.length ? s.agents.map((x) => <Item key={x.id + x.role} x={x} what="agent" />) : <li className="text-xs text-ink-faint">—</li>}</ul>
        <ul><li className="text-xs font-medium text-ink-soft">used</li>{s.used.length ? s.used.map((x) => <Item key={x.id} x={x} what="entity" />) : <li className="text-xs text-ink-faint">—</li>}</ul>
        <ul><li className="text-xs font-medium text-ink-soft">generated</li>{s.generated.length ? s.generated.map((x) => <Item key={x.id} x={x} what="entity" />) : <li className="text-xs text-ink-faint">—</li>}</ul>
      </div>
    </li>
  );
}
