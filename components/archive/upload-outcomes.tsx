// What happened to each bundle of an upload: accepted (link to the run), already imported, or refused and why.
import Link from "next/link";

/** One bundle's outcome as POST /api/v1/imports returns it. */
export type Outcome = { bundle: string; status: "accepted" | "already-imported" | "refused"; runId?: string | null; rows?: number; reason?: string };

const WORD = { accepted: "✓ accepted", "already-imported": "= already imported", refused: "✗ refused" } as const;

/** The list of outcomes, each with a word and a symbol (never colour alone). */
export function UploadOutcomes({ outcomes }: { outcomes: Outcome[] }) {
  return (
    <ul className="mt-3 space-y-2 text-sm" aria-label="upload results">
      {outcomes.map((o, i) => (
        <li key={i} className="rounded border border-line px-3 py-2">
          <span className="font-medium">{WORD[o.status]}</span> <span className="font-mono">{o.bundle}</span>
          {o.runId ? <> — <Link className="underline" href={`/runs/${o.runId}`}>run {o.runId.slice(0, 8)}</Link>{o.rows ? <span className="tabular-nums"> ({o.rows.toLocaleString()} rows)</span> : null}</> : null}
          {o.reason ? <p className="mt-1 font-mono text-xs whitespace-pre-wrap break-words">{o.reason}</p> : null}
          {o.status === "refused" ? <p className="mt-1 text-xs text-ink-soft">Fix what the message names (file, line or field) and upload again; nothing of this bundle was kept.</p> : null}
        </li>
      ))}
    </ul>
  );
}
