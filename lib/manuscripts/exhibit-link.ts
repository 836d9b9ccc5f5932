// The explorer URL that reopens an exhibit's view: its filters in the explorer's canonical URL form, plus the plot's x and grouping.
import { parseExplorerQuery, toSearchParams } from "@/lib/explorer/query";
import type { ExhibitQuery } from "./exhibit-query";

/** `/explorer?…` for an exhibit's stored query (a saved view's query, or one built by hand). */
export function exhibitExplorerHref(query: ExhibitQuery & Record<string, unknown>): string {
  const { x, groupBy, viewId: _viewId, ...rest } = query;
  let sp: URLSearchParams;
  try {
    sp = toSearchParams(parseExplorerQuery(rest));
  } catch {
    // a hand-built query the explorer's stricter schema refuses still opens on its ensembles and observable
    sp = new URLSearchParams();
    if (query.ensembleIds?.length) sp.set("ensemble", query.ensembleIds.join(","));
    if (query.observable) sp.set("observable", query.observable);
    if (query.scope && query.scope !== "point") sp.set("scope", query.scope);
  }
  sp.delete("page");
  if (x) sp.set("x", x);
  if (groupBy && groupBy !== "ensemble") sp.set("groupBy", groupBy);
  const s = sp.toString();
  return `/explorer${s ? `?${s}` : ""}`;
}
