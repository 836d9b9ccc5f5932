"use client";
import { useQuery } from "@tanstack/react-query";
import { fetchJson } from "./fetch-json";

/** One run in an ensemble's grid. */
export type GridRun = { id: string; replica: number; seed: string; state: string; progress: number; attempt: number; failureReason: string | null };
export type GridPoint = { id: string; index: number; params: Record<string, unknown>; runs: GridRun[] };
type Ref = { id: string; name: string } | null;

/** GET /api/v1/ensembles/:id (lib/ensembles/ensemble-detail.ts) as JSON: dates are ISO strings. */
export type EnsembleDetail = {
  id: string; name: string; description: string | null; state: string; tags: string[];
  spec: Record<string, unknown>; specHash: string; masterSeed: string; createdAt: string; finishedAt: string | null;
  sampler: { id: string; name: string; version: string } | null; owner: Ref; group: Ref; allocation: Ref; cluster: Ref;
  counts: Record<string, number> & { total: number }; progress: number;
  coreHours: { reserved: number; charged: number; released: number; held: number };
  replicas: number; points: GridPoint[];
};

const ACTIVE_RUN = ["queued", "dispatched", "running", "collecting"];

/** True while any run may still change state (the page keeps polling). */
export const isLive = (e: EnsembleDetail) => e.state === "active" || ACTIVE_RUN.some((s) => (e.counts[s] ?? 0) > 0);

/** One ensemble, refetched about every 2 s while it is active, then left alone. */
export function useEnsemble(id: string, initial: EnsembleDetail) {
  return useQuery({
    queryKey: ["ensemble", id],
    queryFn: ({ signal }) => fetchJson<{ data: EnsembleDetail }>(`/api/v1/ensembles/${id}`, signal).then((r) => r.data),
    initialData: initial,
    initialDataUpdatedAt: 0, // fetch once on mount: the server render may be seconds old
    refetchInterval: (q) => (q.state.data && isLive(q.state.data) ? 2_000 : false),
  });
}
