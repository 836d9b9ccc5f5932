"use client";
import { keepPreviousData, useMutation, useQuery } from "@tanstack/react-query";
import { ApiError, fetchJson } from "./fetch-json";
import type { ExplorerRow as Row } from "@/lib/explorer/query-estimates";

/** One row of GET /api/v1/estimates (type-only import: the lib module stays on the server). */
export type ExplorerRow = Row;
/** A table page plus the query as the server parsed it (what a saved view stores). */
export type ExplorerPage = { rows: ExplorerRow[]; total: number; page: number; pageSize: number; query: Record<string, unknown>; queryString: string;
  /** `total` is the database's estimate (beyond the exact-count cap): shown as "about N". */ totalEstimated?: boolean };

/** One point of a plotted line, with per-replica points when the query is over point estimates. */
export type PlotPoint = { x: number; mean: number; error: number; tauInt: number | null; estimateId: string; runs?: { x: number; mean: number; error: number; runId: string }[] };
export type PlotData = { series: { key: string; label: string; points: PlotPoint[] }[]; observable: string; x: string; groupBy: string; skipped: number; truncated: boolean };

// the routes answer { data: … } like every /api/v1 route; a bare body is accepted too
const unwrap = <T,>(b: unknown): T => (b && typeof b === "object" && "data" in b && !("rows" in b) && !("series" in b) ? (b as { data: T }).data : (b as T));

/** The table page for the explorer's query string (taken verbatim from the page's URL). */
export function useExplorerEstimates(query: string) {
  return useQuery({
    queryKey: ["explorer-estimates", query],
    queryFn: async ({ signal }): Promise<ExplorerPage> => {
      const b = await fetchJson<{ data: Omit<ExplorerPage, "query" | "queryString">; query: Record<string, unknown>; queryString: string }>(`/api/v1/estimates${query ? `?${query}` : ""}`, signal);
      return { ...b.data, query: b.query, queryString: b.queryString };
    },
    placeholderData: keepPreviousData,
  });
}

/** The plot data for the query plus x and groupBy; disabled until an observable and an x parameter are chosen. */
export function useExplorerPlot(query: string, enabled: boolean) {
  return useQuery({
    queryKey: ["explorer-plot", query],
    queryFn: async ({ signal }): Promise<PlotData> => unwrap<PlotData>(await fetchJson<unknown>(`/api/v1/plots/estimates?${query}`, signal)),
    placeholderData: keepPreviousData,
    enabled,
  });
}

/** A saved explorer view (POST /api/v1/views). */
export type SavedViewInput = { name: string; query: Record<string, unknown>; plot?: { x: string; groupBy: string; logX: boolean; logY: boolean } };

/** Save the current view under a name. */
export function useSaveView() {
  return useMutation({
    mutationFn: async (v: SavedViewInput) => {
      const res = await fetch("/api/v1/views", {
        method: "POST", credentials: "same-origin", headers: { "content-type": "application/json", accept: "application/json" }, body: JSON.stringify(v),
      });
      const body = await res.json().catch(() => null);
      if (!res.ok) {
        const e = (body as { error?: { code?: string; message?: string } } | null)?.error;
        throw new ApiError(res.status, e?.code ?? `http_${res.status}`, e?.message ?? `saving the view answered ${res.status}`);
      }
      return unwrap<{ id: string; name: string }>(body);
    },
  });
}
