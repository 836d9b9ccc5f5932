"use client";
import { keepPreviousData, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { ApiError, fetchJson } from "./fetch-json";

/** The choices of a re-analysis: which observable, where the thermalisation cut is, which window rule. */
export type AnalysisChoice = { observable: string; cut?: number | null; window?: "wolff" | "madras-sokal" };

/** One stored estimate version of a run's observable (old versions are kept). */
export type EstimateVersion = {
  id: string; version: number; isCurrent: boolean; mean: number; error: number; tauInt: number | null; tauIntError?: number | null;
  thermCut: number; window: number | null; method: string; analysisVersion: string;
  chosenById: string | null; chosenAt: string | null; createdAt: string;
};

/** GET /api/v1/runs/:id/analysis (lib/explorer/run-analysis.ts) as JSON: the estimate recomputed with the choices, not saved. */
export type RunAnalysis = {
  runId: string; observable: string;
  series: { total: number; shown: number; stride: number; method: string; points: { i: number; sweep: number | null; value: number }[] };
  cut: { index: number; rule: string };
  acf: { lags: number; rho: number[]; tauIntByWindow: number[]; window: number; method: string; parameter: number };
  tauInt: number; tauIntError: number;
  blocking: { levels: { level: number; blockSize: number; nBlocks: number; error: number; errorOfError: number }[]; plateau: { level: number }; plateauFound: boolean; warnings: string[] } | null;
  blockingProblem: string | null;
  estimate: { mean: number; error: number; tauInt: number; tauIntError: number; n: number; nTotal: number; window: number; method: string; analysisVersion: string; warnings: string[] };
  versions: EstimateVersion[];
};

const qs = (c: AnalysisChoice) => {
  const p = new URLSearchParams({ observable: c.observable });
  if (c.cut !== undefined && c.cut !== null) p.set("cut", String(c.cut));
  if (c.window) p.set("window", c.window);
  return p.toString();
};

/** A run's analysis for one set of choices; the previous answer stays on screen while the next is computed. */
export function useRunAnalysis(runId: string, choice: AnalysisChoice) {
  return useQuery({
    queryKey: ["run-analysis", runId, choice.observable, choice.cut ?? null, choice.window ?? null],
    queryFn: ({ signal }): Promise<RunAnalysis> => fetchJson<{ data: RunAnalysis } | RunAnalysis>(`/api/v1/runs/${runId}/analysis?${qs(choice)}`, signal).then((b) => unwrap<RunAnalysis>(b)),
    placeholderData: keepPreviousData,
    enabled: Boolean(choice.observable),
  });
}

/** Save the current choices as a new estimate version (POST /api/v1/runs/:id/estimates). */
export function useSaveEstimate(runId: string) {
  const client = useQueryClient();
  return useMutation({
    mutationFn: async (c: AnalysisChoice) => {
      const res = await fetch(`/api/v1/runs/${runId}/estimates`, {
        method: "POST", credentials: "same-origin", headers: { "content-type": "application/json", accept: "application/json" },
        body: JSON.stringify({ observable: c.observable, ...(c.cut !== undefined && c.cut !== null ? { cut: c.cut } : {}), ...(c.window ? { window: c.window } : {}) }),
      });
      const body = await res.json().catch(() => null);
      if (!res.ok) {
        const e = (body as { error?: { code?: string; message?: string } } | null)?.error;
        throw new ApiError(res.status, e?.code ?? `http_${res.status}`, e?.message ?? `saving answered ${res.status}`);
      }
      return unwrap<{ estimate: EstimateVersion; previousVersion: number | null }>(body as { data: { estimate: EstimateVersion; previousVersion: number | null } });
    },
    onSuccess: () => {
      void client.invalidateQueries({ queryKey: ["run-analysis", runId] });
      void client.invalidateQueries({ queryKey: ["run", runId] });
    },
  });
}

/** GET /api/v1/runs/:id/spectrum (lib/explorer/run-spectrum.ts): counting function with its Weyl fit and d_s(σ). */
export type RunSpectrum = {
  eigenvalues: number; shift: number;
  counting: { lambda: number; N: number; weyl: number | null }[];
  weyl: { dimension: number; dimensionError: number; logPrefactor: number; window: [number, number]; points: number; zeroModes: number } | null;
  weylProblem: string | null;
  heatKernel: { sigma: number; K: number; logK: number; ds: number }[];
  zeroModes: number; analysisVersion: string;
};

/** A run's spectrum, or null when the run stores none (404 with code "no_spectrum" or similar). */
export function useRunSpectrum(runId: string, enabled: boolean) {
  return useQuery({
    queryKey: ["run-spectrum", runId],
    queryFn: ({ signal }): Promise<RunSpectrum | null> => fetchJson<{ data: RunSpectrum } | RunSpectrum>(`/api/v1/runs/${runId}/spectrum`, signal).then((b) => unwrap<RunSpectrum>(b))
      .catch((e) => { if (e instanceof ApiError && e.status === 404) return null; throw e; }),
    enabled,
    staleTime: Infinity,
  });
}

function unwrap<T extends object>(b: { data: T } | T): T {
  return "data" in b && (b as { data: T }).data && typeof (b as { data: T }).data === "object" ? (b as { data: T }).data : (b as T);
}
