"use client";
// The explorer's "Add to manuscript": save what is on screen as a view and make it an exhibit of a draft, in one step.
import Link from "next/link";
import { useState } from "react";
import { Button } from "@/components/ui/button";
import { useAddViewToManuscript, useDraftManuscripts } from "./use-draft-manuscripts";

const input = "rounded-md border border-line-strong bg-paper-raised px-2 py-1 text-sm w-full";

/** Shown only to people with a draft they may edit; `query` is the table's parsed query, `plot` the plot's choices. */
export function AddToManuscript({ query, plot }: { query: Record<string, unknown> | undefined; plot: { x: string; groupBy: string; logX: boolean; logY: boolean } | null }) {
  const drafts = useDraftManuscripts();
  const add = useAddViewToManuscript();
  const [open, setOpen] = useState(false);
  const [msId, setMsId] = useState("");
  const [label, setLabel] = useState("");
  const [caption, setCaption] = useState("");
  if (!drafts.data?.length) return null;
  const ms = drafts.data.find((d) => d.id === msId) ?? drafts.data[0];
  const kind = /^tab/i.test(label.trim()) ? "table" : "figure";
  return (
    <details className="relative text-sm" open={open} onToggle={(e) => setOpen((e.target as HTMLDetailsElement).open)}>
      <summary className="list-none cursor-pointer rounded-md border border-line-strong bg-paper-raised px-3 py-1.5 font-medium hover:bg-paper-sunken">Add to manuscript</summary>
      <form aria-label="Add to manuscript" className="absolute right-0 z-20 mt-1 w-80 space-y-2 rounded-md border border-line bg-paper-raised p-3 shadow-md"
        onSubmit={(e) => { e.preventDefault(); if (query && label.trim()) add.mutate({ manuscript: ms, label: label.trim(), caption: caption.trim() || null, kind, query, plot }); }}>
        <label className="block text-xs text-ink-soft">Manuscript
          <select aria-label="Manuscript" value={ms.id} onChange={(e) => { setMsId(e.target.value); add.reset(); }} className={input}>
            {drafts.data.map((d) => <option key={d.id} value={d.id}>{d.title} ({d.exhibits} exhibits)</option>)}
          </select>
        </label>
        <label className="block text-xs text-ink-soft">Label, e.g. Fig. 2 or Table 1
          <input aria-label="Exhibit label" value={label} onChange={(e) => { setLabel(e.target.value); add.reset(); }} placeholder="Fig. 2" className={input} />
        </label>
        <label className="block text-xs text-ink-soft">Caption (optional)
          <input aria-label="Exhibit caption" value={caption} onChange={(e) => setCaption(e.target.value)} className={input} />
        </label>
        <p className="text-xs text-ink-faint">Saved as a {kind}{plot ? ` (plot against ${plot.x})` : " (no plot: choose an observable to make it a figure)"}, shared with {ms.groupName}.</p>
        <Button type="submit" disabled={!label.trim() || !query || add.isPending}>{add.isPending ? "Adding…" : "Add exhibit"}</Button>
        {add.isSuccess ? <p className="text-xs text-accent-strong" data-testid="exhibit-added">Added “{add.data.label}” to <Link className="underline" href={`/manuscripts/${add.data.manuscript.id}`}>{add.data.manuscript.title}</Link>.</p> : null}
        {add.error ? <p role="alert" className="text-xs text-danger">Not added: {add.error.message}</p> : null}
      </form>
    </details>
  );
}
