"use client";
// Upload result bundles: XHR so the upload's progress can be shown, then an indeterminate "importing" phase.
import { useRouter } from "next/navigation";
import { useRef, useState } from "react";
import { Button } from "@/components/ui/button";
import { ProgressBar } from "@/components/ui/progress-bar";
import { UploadOutcomes, type Outcome } from "./upload-outcomes";

type Phase = { kind: "idle" } | { kind: "uploading"; share: number } | { kind: "importing" } | { kind: "done"; outcomes: Outcome[] } | { kind: "failed"; message: string };

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
    xhr.upload.onprogress = (e) => setPhase({ kind: "uploading", share: e.lengthComputable ? e.loaded / e.total : 0 });
    xhr.upload.onload = () => setPhase({ kind: "importing" });
    xhr.onerror = () => setPhase({ kind: "failed", message: "The upload was interrupted (network). Nothing was imported from it; try again." });
    xhr.onload = () => {
      let body: { data?: { bundles: Outcome[] }; error?: { message: string } } = {};
      try { body = JSON.parse(xhr.responseText); } catch { /* not JSON */ }
      if (xhr.status >= 400 || !body.data) {
        setPhase({ kind: "failed", message: body.error?.message ?? `The server answered ${xhr.status}.` });
        return;
      }
      setPhase({ kind: "done", outcomes: body.data.bundles });
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
      {phase.kind === "importing" ? (
        <div className="mt-3 text-sm" role="status"><ProgressBar value={1} label="importing" tone="bg-accent animate-pulse" /> Uploaded; checking and importing each bundle (hashes, series, estimates)…</div>
      ) : null}
      {phase.kind === "failed" ? <p className="mt-3 text-sm text-red-700" role="alert">{phase.message}</p> : null}
      {phase.kind === "done" ? <UploadOutcomes outcomes={phase.outcomes} /> : null}
    </section>
  );
}
