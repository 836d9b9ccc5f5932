"use client";
import { useCallback, useMemo } from "react";
import { usePathname, useRouter, useSearchParams } from "next/navigation";

/** Page-URL keys that belong to the plot, not to the table's query. */
export const PLOT_KEYS = ["x", "groupBy", "logX", "logY", "replicas"] as const;
const TABLE_ONLY = ["page", "pageSize", "sort", "dir", "columns"];

/** One parameter range as the URL writes it: p.<name>=<min>..<max>. */
export type ParamRange = { name: string; min: string; max: string };

/**
 * The explorer's whole view in the page URL (lib/explorer/query.ts defines the form), so a view
 * can be bookmarked and shared. Any change but paging returns to page 1.
 */
export function useExplorerUrl() {
  const search = useSearchParams();
  const router = useRouter();
  const pathname = usePathname();
  const get = useCallback((k: string) => search.get(k) ?? "", [search]);
  const ranges = useMemo<ParamRange[]>(() => [...search.entries()].filter(([k]) => k.startsWith("p.")).map(([k, v]) => {
    const [min, max] = v.includes("..") ? v.split("..") : [v, v];
    return { name: k.slice(2), min: min ?? "", max: max ?? "" };
  }), [search]);
  const write = useCallback((next: URLSearchParams) => {
    const qs = next.toString();
    router.replace(qs ? `${pathname}?${qs}` : pathname, { scroll: false });
  }, [router, pathname]);
  const set = useCallback((change: Record<string, string | number | null>) => {
    const next = new URLSearchParams(search.toString());
    for (const [k, v] of Object.entries(change)) {
      if (v === null || v === "") next.delete(k);
      else next.set(k, String(v));
    }
    if (!("page" in change)) next.delete("page");
    write(next);
  }, [search, write]);
  const setRanges = useCallback((list: ParamRange[]) => {
    const next = new URLSearchParams(search.toString());
    for (const k of [...next.keys()]) if (k.startsWith("p.")) next.delete(k);
    for (const r of list) if (r.name && (r.min !== "" || r.max !== "")) next.append(`p.${r.name}`, `${r.min}..${r.max}`);
    next.delete("page");
    write(next);
  }, [search, write]);
  const tableQuery = useMemo(() => strip(search, PLOT_KEYS), [search]);
  // the plot reads every matching row, so paging and sorting do not change it
  const plotQuery = useMemo(() => strip(search, [...TABLE_ONLY, "logX", "logY", "replicas"]), [search]);
  return { get, ranges, set, setRanges, tableQuery, plotQuery, all: search.toString() };
}

function strip(search: URLSearchParams, keys: readonly string[]) {
  const next = new URLSearchParams(search.toString());
  for (const k of keys) next.delete(k);
  return next.toString();
}
