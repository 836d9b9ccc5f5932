"use client";
// Upload result bundles: XHR so the upload's progress can be shown, then the import's progress per bundle,
// read from the streamed (NDJSON) answer as it arrives.
import { useRouter } from "next/navigation";
import { useRef, useState } from "react";
import { Button } from "@/components/ui/button";
import { ProgressBar } from "@/components/ui/progress-bar";
import { importShare, lineReader, step, STAGE_WORDS, type ImportState } from "./import-progress";
import { UploadOutcomes, type Outcome } from "./upload-outcomes";

type Phase = { kind: "idle" } | { kind: "uploading"; share: number } | { kind: "importing"; state: ImportState } | { kind: "done"; outcomes: Outcome[] } | { kind: "failed"; message: string };

/** The upload form of the Archive page; `limits` is stated as the server enforces it. */
export function UploadForm({ limits, groups }: { limits: string; groups: { id: string; name: string }[] }) {
  const [phase, setPhase] = useState<Phase>({ kind: "idle" });
  const files = useRef<HTMLInputElement>(null);
  const folder = useRef<HTMLInputElement>(null);
  const group = useRef<HTMLSelectElement>(null);
  const router = useRouter();

  function send(list: FileList | null) {
    if (!list || list.length === 0) { setPhase({ kind: "failed", message: "Choose the files of a bundle folder, or one .zip or .tar.gz." }); return; }
    const form = new FormData();
    for (const f of Array.from(list)) form.append("file", f, (f as File & { webkitRelativePath?: string }).webkitRelativePath || f.name);
    const xhr = new XMLHttpRequest();
    xhr.open("POST", `/api/v1/imports${group.current?.value ? `?group=${encodeURIComponent(group.current.value)}` : ""}`);
    xhr.setRequestHeader("accept", "application/x-ndjson");
    let state: ImportState = { total: 0, done: [], current: null };
    let result: Outcome[] | null = null;
    let failure: string | null = null;
    const read = lineReader();
    const take = () => {
      for (const line of read(xhr.responseText)) {
        if (line.type === "result") result = line.data.bundles;
        else if (line.type === "error") failure = line.error.message;
        else state = step(state, line);
      }
      if (!result && !failure) setPhase({ kind: "importing", state });
    };
    xhr.upload.onprogress = (e) => setPhase({ kind: "uploading", share: e.lengthComputable ? e.loaded / e.total : 0 });
    xhr.upload.onload = () => setPhase({ kind: "importing", state });
    xhr.onprogress = () => { if (xhr.status === 200) take(); };
    xhr.onerror = () => setPhase({ kind: "failed", message: "The upload was interrupted (network). Bundles reported done before it were imported; upload again to finish the rest (done ones are recognised)." });
    xhr.onload = () => {
      if (xhr.status >= 400) {
        let body: { error?: { message: string } } = {};
        try { body = JSON.parse(xhr.responseText); } catch { /* not JSON */ }
        setPhase({ kind: "failed", message: body.error?.message ?? `The server answered ${xhr.status}.` });
        return;
      }
      take();
      if (failure || !result) {
        setPhase({ kind: "failed", message: `${failure ?? "The answer ended before the import finished."} ${state.done.length} of ${state.total} bundles were done before it.` });
        return;
      }
      setPhase({ kind: "done", outcomes: result });
      router.refresh();
    };
    setPhase({ kind: "uploading", share: 0 });
    xhr.send(form);
  }

  const busy = phase.kind === "uploading" || phase.kind === "importing";
  return (
    <section className="rounded-lg border border-line p-4 mb-8" aria-labelledby="upload-title">
      <h2 id="upload-title" className="font-medium">Upload result bundles</h2>
      <p className="text-sm text-ink-soft mt-1">
        A bundle folder (manifest.json, the series file, extra files), or one .zip or .tar.gz holding one or more bundles. {limits}
        {" "}Each bundle gets the same checks as cluster results; the same bundle twice is imported once.
      </p>
      <div className="flex flex-wrap items-center gap-3 mt-3">
        {groups.length > 1 ? (
          <label className="text-sm">Group{" "}
            <select ref={group} className="rounded border border-line px-2 py-1" disabled={busy}>
              {groups.map((g) => <option key={g.id} value={g.id}>{g.name}</option>)}
            </select>
          </label>
        ) : null}
        <input ref={files} type="file" multiple accept=".zip,.tar.gz,.tgz,.json,.csv,.f64le,application/zip,application/gzip" className="text-sm" disabled={busy} aria-label="bundle files or archive" />
        <Button type="button" disabled={busy} onClick={() => send(files.current?.files ?? null)}>Upload files</Button>
        <input ref={folder} type="file" className="hidden" disabled={busy} onChange={() => send(folder.current?.files ?? null)}
          {...({ webkitdirectory: "", directory: "" } as Record<string, string>)} aria-label="bundle folder" />
        <Button type="button" variant="quiet" disabled={busy} onClick={() => folder.current?.click()}>Upload a folder…</Button>
      </div>
      {phase.kind === "uploading" ? (
        <div className="mt-3 text-sm"><ProgressBar value={phase.share} label="upload progress" /> <span className="tabular-nums">Uploading… {Math.round(phase.share * 100)} %</span></div>
      ) : null}
      {phase.kind === "importing" ? <ImportingNow state={phase.state} /> : null}
      {phase.kind === "failed" ? <p className="mt-3 text-sm text-red-700" role="alert">{phase.message}</p> : null}
      {phase.kind === "done" ? <UploadOutcomes outcomes={phase.outcomes} /> : null}
    </section>
  );
}

/** The import's progress: a bar over all bundles, which bundle is at which step, and the outcomes so far. */
function ImportingNow({ state }: { state: ImportState }) {
  const share = importShare(state);
  const now = state.current && state.current.index >= state.done.length ? state.current : null;
  return (
    <div className="mt-3 text-sm" role="status">
      <ProgressBar value={share} label="import progress" />
      <p className="mt-1 tabular-nums">
        {state.total === 0 ? "Uploaded; unpacking and finding bundles…" : `Importing: ${state.done.length} of ${state.total} bundle${state.total === 1 ? "" : "s"} done (${Math.round(share * 100)} %)`}
        {now ? <> — bundle {now.index + 1}: {STAGE_WORDS[now.stage as keyof typeof STAGE_WORDS] ?? now.stage} <span className="font-mono">{now.bundle}</span></> : null}
      </p>
      {state.done.length ? <UploadOutcomes outcomes={state.done} /> : null}
    </div>
  );
}
