// The provenance graph as a hand-made SVG: a layered drawing (sources left, results right) of a few dozen boxes
// and curves. Hand-made because the installed chart library (recharts) draws data plots, not node-link diagrams,
// and a layout engine would be a new package for what a longest-path layering does well enough at this size.
import type { GraphNode, NodeKind, ProvGraph } from "@/lib/provenance/prov-graph";

const W = 158, H = 34, GAP_X = 40, GAP_Y = 10, PAD = 8;

/** Fill and stroke per kind; activities are rectangles, agents have cut corners, entities rounded corners (PROV's usual shapes, simplified). */
const STYLE: Record<NodeKind, { fill: string; stroke: string; word: string }> = {
  person: { fill: "#fdf3e1", stroke: "#E69F00", word: "person" },
  software: { fill: "#fdf3e1", stroke: "#b37a00", word: "software" },
  input: { fill: "#fbfbe6", stroke: "#a7a25a", word: "input" },
  activity: { fill: "#e3f0ef", stroke: "#0f6b6b", word: "activity" },
  file: { fill: "#ffffff", stroke: "#7a838e", word: "file" },
  series: { fill: "#eef5fb", stroke: "#0072B2", word: "series" },
  estimate: { fill: "#e9f6f1", stroke: "#009E73", word: "estimate" },
  other: { fill: "#ffffff", stroke: "#c9ced3", word: "entity" },
};

const x = (n: GraphNode) => PAD + n.layer * (W + GAP_X);
const y = (n: GraphNode) => PAD + n.row * (H + GAP_Y);
const short = (s: string, n = 24) => (s.length > n ? `${s.slice(0, n - 1)}…` : s);

function Shape({ n, focus }: { n: GraphNode; focus: boolean }) {
  const s = STYLE[n.kind];
  const width = focus ? 3 : n.element === "activity" ? 1.5 : 1;
  if (n.element === "agent") {
    const c = 8, x0 = x(n), y0 = y(n);
    return <polygon points={`${x0 + c},${y0} ${x0 + W - c},${y0} ${x0 + W},${y0 + c} ${x0 + W},${y0 + H - c} ${x0 + W - c},${y0 + H} ${x0 + c},${y0 + H} ${x0},${y0 + H - c} ${x0},${y0 + c}`} fill={s.fill} stroke={s.stroke} strokeWidth={width} />;
  }
  return <rect x={x(n)} y={y(n)} width={W} height={H} rx={n.element === "entity" ? 12 : 2} fill={s.fill} stroke={s.stroke} strokeWidth={width} />;
}

/** The graph; every node with a page is a link to it, and hovering shows its full label and facts. */
export function ProvGraphSvg({ graph, focus }: { graph: ProvGraph; focus?: string }) {
  const byId = new Map(graph.nodes.map((n) => [n.id, n]));
  const width = PAD * 2 + graph.layers * W + (graph.layers - 1) * GAP_X;
  const height = PAD * 2 + graph.rows * H + (graph.rows - 1) * GAP_Y;
  return (
    <div className="overflow-x-auto" data-testid="prov-graph">
      <svg width="100%" style={{ maxWidth: width, minWidth: Math.min(width, 900) }} viewBox={`0 0 ${width} ${height}`} role="img" aria-label={`provenance graph: ${graph.nodes.length} nodes, ${graph.edges.length} relations`} className="text-[11px]">
        <g fill="none" stroke="#c9ced3">
          {graph.edges.map((e, i) => {
            const a = byId.get(e.from)!, b = byId.get(e.to)!;
            const x1 = x(a) + W, y1 = y(a) + H / 2, x2 = x(b), y2 = y(b) + H / 2, mid = (x1 + x2) / 2;
            return <path key={i} d={`M${x1},${y1} C${mid},${y1} ${mid},${y2} ${x2},${y2}`} strokeDasharray={e.relation === "wasAssociatedWith" ? "3 3" : undefined} data-relation={e.relation}><title>{`${e.from} → ${e.to} (${e.relation}${e.role ? `, ${e.role}` : ""})`}</title></path>;
          })}
        </g>
        {graph.nodes.map((n) => {
          const body = (
            <g data-node={n.id} data-kind={n.kind} data-focus={n.id === focus ? "true" : undefined}>
              <title>{[`${n.label} (${STYLE[n.kind].word})`, n.id, ...n.facts.map(([k, v]) => `${k}: ${v}`)].join("\n")}</title>
              <Shape n={n} focus={n.id === focus} />
              <text x={x(n) + 8} y={y(n) + 14} fill="#1c2127" className={n.href ? "underline decoration-dotted" : undefined}>{short(n.label)}</text>
              <text x={x(n) + 8} y={y(n) + 27} fill="#7a838e" className="text-[9.5px]">{STYLE[n.kind].word}{n.facts[0] ? ` · ${short(`${n.facts[0][0]} ${n.facts[0][1]}`, 22)}` : ""}</text>
            </g>
          );
          return n.href ? <a key={n.id} href={n.href} aria-label={`${n.label} (${STYLE[n.kind].word})`}>{body}</a> : <g key={n.id}>{body}</g>;
        })}
      </svg>
    </div>
  );
}
