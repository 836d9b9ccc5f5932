"use client";
import { useCallback, useMemo } from "react";
import { usePathname, useRouter, useSearchParams } from "next/navigation";

/**
 * A table's view (filters, sort, page) kept in the page's search params, so a view can be
 * bookmarked and shared. Changing a filter or the sort returns to page 1.
 */
export function useUrlParams<K extends string>(keys: readonly K[]) {
  const search = useSearchParams();
  const router = useRouter();
  const pathname = usePathname();
  const values = useMemo(() => Object.fromEntries(keys.map((k) => [k, search.get(k) ?? ""])) as Record<K, string>, [search, keys]);
  const set = useCallback((change: Partial<Record<K, string | number | null>>) => {
    const next = new URLSearchParams(search.toString());
    for (const [k, v] of Object.entries(change) as [K, string | number | null | undefined][]) {
      if (v === null || v === undefined || v === "") next.delete(k);
      else next.set(k, String(v));
    }
    if (!("page" in change)) next.delete("page");
    const qs = next.toString();
    router.replace(qs ? `${pathname}?${qs}` : pathname, { scroll: false });
  }, [search, router, pathname]);
  return { values, set, query: search.toString() };
}
