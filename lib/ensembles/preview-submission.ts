import "server-only";
// What a submission would do, without doing it: points, runs, seeds, core-hours against the balance.
import { AppError } from "@/lib/errors";
import type { Identity } from "@/lib/auth/identity";
import { expandSpec, type EnsembleSpec } from "@/lib/spec";
import { checkFunds, type AdmissionExplanation } from "./funds";
import { coreHoursPerRun, resolvePlacement } from "./placement";

/** The preview shown before submitting (form, API, CLI). */
export type SubmissionPreview = {
  points: number;
  runs: number;
  replicas: number;
  /** The first few runs with their parameters and seeds. */
  seeds: { pointIndex: number; replica: number; seed: string; params: Record<string, unknown> }[];
  coreHoursPerRun: number;
  coreHoursNeeded: number;
  allocation: { id: string; name: string; available: number } | null;
  cluster: { id: string; name: string } | null;
  cap: { limit: number; used: number; remaining: number; rule?: string } | null;
  /** Why the submission would be refused (limit, needed, free, who to ask); null when it would be admitted. */
  explanation: AdmissionExplanation | null;
  /** Things to know before submitting that do not refuse it (e.g. near the per-person cap). */
  warnings: string[];
  ok: boolean;
  problems: { path?: string; code: string; message: string }[];
};

/** Preview a parsed spec for `who`; placement and funds problems are listed, not thrown. */
export async function previewSubmission(who: Identity, spec: EnsembleSpec, sampleSize = 12): Promise<SubmissionPreview> {
  const { points, runs } = expandSpec(spec);
  const perRun = coreHoursPerRun(spec);
  const needed = Math.round(perRun * runs.length * 1e4) / 1e4;
  const preview: SubmissionPreview = {
    points: points.length, runs: runs.length, replicas: spec.replicas,
    seeds: runs.slice(0, sampleSize).map((r) => ({ ...r, params: points[r.pointIndex].params })),
    coreHoursPerRun: perRun, coreHoursNeeded: needed, allocation: null, cluster: null, cap: null, explanation: null, warnings: [], ok: false, problems: [],
  };
  try {
    const placement = await resolvePlacement(who, spec);
    const funds = await checkFunds(placement.allocation, who.userId, needed, { clusterId: placement.cluster.id });
    preview.allocation = { id: placement.allocation.id, name: placement.allocation.name, available: funds.available };
    preview.cluster = { id: placement.cluster.id, name: placement.cluster.name };
    preview.cap = funds.cap;
    preview.explanation = funds.explanation;
    preview.warnings = funds.warnings;
    preview.problems.push(...funds.problems.map((p) => ({ code: p.code, message: p.message })));
  } catch (err) {
    if (!(err instanceof AppError) || err.code === "forbidden") throw err;
    const issues = err.details?.issues ?? [];
    preview.problems.push(...(issues.length ? issues.map((i) => ({ path: i.path, code: err.code, message: i.message })) : [{ code: err.code, message: err.message }]));
  }
  preview.ok = preview.problems.length === 0;
  return preview;
}
