// Pilot chains grouped by parameter point, each group's stats combined (see pointStats).
import { canonicalJson } from "@/lib/spec/spec-hash";
import { pointStats } from "./formula";
import type { MeasuredPoint, PilotChain } from "./types";

/** Group chains with equal params (key order ignored) into measured points. */
export function measuredPoints(chains: PilotChain[]): MeasuredPoint[] {
  const groups = new Map<string, PilotChain[]>();
  for (const c of chains) {
    const key = canonicalJson(c.params);
    groups.set(key, [...(groups.get(key) ?? []), c]);
  }
  return [...groups.values()].map((cs) => ({ params: cs[0].params, stats: pointStats(cs), chains: cs }));
}
