"use client";
import { Field, inputClass } from "@/components/ui/field";
import { issuesAt, randomSeed, type Draft } from "./spec-draft";

type Issues = { path: string; message: string }[];
// the failure reasons a retry can fix (the spec format's list)
const RETRYABLE = ["nonzero_exit", "wall_time_exceeded", "node_lost", "connection_lost", "dispatch_failed"];

type Props = { draft: Draft; issues: Issues; update: (d: Partial<Draft>) => void };

function Num({ label, k, path, hint, draft, issues, update }: Props & { label: string; k: keyof Draft; path: string; hint?: string }) {
  return (
    <Field label={label} hint={hint} error={issuesAt(issues, path)}>
      <input aria-label={label} value={String(draft[k])} onChange={(e) => update({ [k]: e.target.value } as Partial<Draft>)} inputMode="numeric" className={`${inputClass} num`} />
    </Field>
  );
}

/** Chains, sweeps, seed, resources, retries, e-mail and tags: everything of a spec besides the parameters. */
export function RunFields(props: Props) {
  const { draft, issues, update } = props;
  return (
    <>
      <fieldset>
        <legend className="text-xs font-medium uppercase tracking-wide text-ink-soft mb-2">Chains</legend>
        <div className="grid gap-3 sm:grid-cols-4">
          <Num {...props} label="Replicas per point" k="replicas" path="/replicas" />
          <Num {...props} label="Thermalization" k="thermalization" path="/thermalization" hint="sweeps before measuring" />
          <Num {...props} label="Measurements" k="measurements" path="/measurements" />
          <Num {...props} label="Interval" k="interval" path="/interval" hint="sweeps between measurements" />
        </div>
        <div className="mt-3 max-w-md">
          <Field label="Master seed" hint="unsigned 64-bit integer; every run's seed is derived from it" error={issuesAt(issues, "/seed")}>
            <span className="flex gap-2">
              <input aria-label="Master seed" value={draft.seed} onChange={(e) => update({ seed: e.target.value })} className={`${inputClass} mono`} />
              <button type="button" className="text-xs text-accent hover:underline whitespace-nowrap" onClick={() => update({ seed: randomSeed() })}>new seed</button>
            </span>
          </Field>
        </div>
      </fieldset>
      <fieldset>
        <legend className="text-xs font-medium uppercase tracking-wide text-ink-soft mb-2">Resources per run</legend>
        <div className="grid gap-3 sm:grid-cols-3">
          <Num {...props} label="Cores" k="cores" path="/resources/cores" />
          <Num {...props} label="Wall time (minutes)" k="wallMinutes" path="/resources/wallMinutes" hint="reserved: cores × wall time × runs" />
          <Num {...props} label="Memory (MiB)" k="memoryMb" path="/resources/memoryMb" />
        </div>
      </fieldset>
      <fieldset>
        <legend className="text-xs font-medium uppercase tracking-wide text-ink-soft mb-2">Retry and notification</legend>
        <div className="grid gap-3 sm:grid-cols-3">
          <Num {...props} label="Attempts per run" k="maxAttempts" path="/retry/maxAttempts" hint="1 = no retry" />
          <div className="text-sm sm:col-span-2">
            <span className="block font-medium text-ink-soft mb-1">Retry on</span>
            <span className="flex flex-wrap gap-x-3 gap-y-1">
              {RETRYABLE.map((r) => (
                <label key={r} className="flex items-center gap-1 mono">
                  <input type="checkbox" checked={draft.retryOn.includes(r)} onChange={(e) => update({ retryOn: e.target.checked ? [...draft.retryOn, r] : draft.retryOn.filter((x) => x !== r) })} />{r}
                </label>
              ))}
            </span>
            <label className="flex items-center gap-1 mt-1"><input type="checkbox" checked={draft.resumeOnWallTime} onChange={(e) => update({ resumeOnWallTime: e.target.checked })} /> resume from the checkpoint when a run hits its wall time</label>
            {issuesAt(issues, "/retry") ? <span role="alert" className="block text-xs text-danger">{issuesAt(issues, "/retry")}</span> : null}
          </div>
        </div>
        <div className="flex gap-4 text-sm mt-3">
          <label className="flex items-center gap-1"><input type="checkbox" checked={draft.onFailure} onChange={(e) => update({ onFailure: e.target.checked })} /> e-mail me when runs fail</label>
          <label className="flex items-center gap-1"><input type="checkbox" checked={draft.onDone} onChange={(e) => update({ onDone: e.target.checked })} /> e-mail me when all runs have ended</label>
        </div>
      </fieldset>
      <Field label="Tags" hint="comma-separated, e.g. critical-scan, L16" error={issuesAt(issues, "/tags")}>
        <input aria-label="Tags" value={draft.tags} onChange={(e) => update({ tags: e.target.value })} className={inputClass} />
      </Field>
    </>
  );
}
