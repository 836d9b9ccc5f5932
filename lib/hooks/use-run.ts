"use client";
import { useQuery } from "@tanstack/react-query";
import { fetchJson } from "./fetch-json";

/** One state change of a run. */
export type RunEventRow = { id: string; at: string; from: string | null; to: string; cause: string; detail: Record<string, unknown>; actor: { id: string; name: string } | null };
/** One current estimate of a run's observable. */
export type RunEstimate = { observable: string; mean: number; error: number; tauInt: number | null; tauIntError: number | null; thermCut: number; n: number; window: number | null; method: string; analysisVersion: string };

/** GET /api/v1/runs/:id (lib/ensembles/run-detail.ts) as JSON: dates are ISO strings. */
export type RunDetail = {
  id: string; ensembleId: string; replica: number; seed: string; state: string; attempt: number; source: string; cores: number;
  workDir: string | null; schedulerJobId: string | null; exitCode: number | null;
  failureReason: string | null; failureDetail: string | null; stderrTail: string | null;
  progress: number; sweepsDone: number; sweepsTotal: number | null;
  reservedCoreHours: number; coreHoursUsed: number | null; host: string | null; samplerCommit: string | null;
  queuedAt: string; dispatchedAt: string | null; startedAt: string | null; finishedAt: string | null;
  point: { id: string; pointIndex: number; params: Record<string, unknown> };
  ensemble: { id: string; name: string; state: string };
  events: RunEventRow[]; estimates: RunEstimate[];
};

const LIVE = ["queued", "dispatched", "running", "collecting"];

/** One run, refetched about every 2 s until it ends. */
export function useRun(id: string, initial: RunDetail) {
  return useQuery({
    queryKey: ["run", id],
    queryFn: ({ signal }) => fetchJson<{ data: RunDetail }>(`/api/v1/runs/${id}`, signal).then((r) => r.data),
    initialData: initial,
    initialDataUpdatedAt: 0,
    refetchInterval: (q) => (q.state.data && LIVE.includes(q.state.data.state) ? 2_000 : false),
  });
}
