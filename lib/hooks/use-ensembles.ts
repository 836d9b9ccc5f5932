"use client";
import { keepPreviousData, useQuery } from "@tanstack/react-query";
import { fetchJson } from "./fetch-json";

import type { EnsembleRow as Row } from "@/lib/ensembles/list-ensembles";

/** One row of GET /api/v1/ensembles (type-only import: the lib module stays on the server). */
export type EnsembleRow = Row;

export type EnsemblePage = { data: EnsembleRow[]; total: number; page: number; pageSize: number };

/** The ensembles list for a query string (filters, sort, page) taken verbatim from the page's URL. */
export function useEnsembles(query: string) {
  return useQuery({
    queryKey: ["ensembles", query],
    queryFn: ({ signal }) => fetchJson<EnsemblePage>(`/api/v1/ensembles${query ? `?${query}` : ""}`, signal),
    placeholderData: keepPreviousData,
    // the list shows live states too, but slower than one ensemble's page
    refetchInterval: 10_000,
  });
}
