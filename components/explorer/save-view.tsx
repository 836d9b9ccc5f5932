"use client";
import { useState } from "react";
import { useSaveView } from "@/lib/hooks/use-explorer";
import { Button } from "@/components/ui/button";

/** Name the current view (filters, sort, plot) and save it, e.g. to cite it as a manuscript exhibit. */
export function SaveView({ query, plot }: { query: Record<string, unknown> | undefined; plot: { x: string; groupBy: string; logX: boolean; logY: boolean } | null }) {
  const [name, setName] = useState("");
  const save = useSaveView();
  return (
    <form className="flex items-center gap-2 text-sm" onSubmit={(e) => { e.preventDefault(); if (name.trim() && query) save.mutate({ name: name.trim(), query, ...(plot ? { plot } : {}) }); }}>
      <input aria-label="View name" value={name} onChange={(e) => { setName(e.target.value); save.reset(); }} placeholder="name this view" className="rounded-md border border-line-strong bg-paper-raised px-2 py-1 text-sm w-44" />
      <Button type="submit" variant="quiet" disabled={!name.trim() || !query || save.isPending}>{save.isPending ? "Saving…" : "Save view"}</Button>
      {save.isSuccess ? <span className="text-xs text-accent-strong" data-testid="view-saved">Saved “{save.data.name}”.</span> : null}
      {save.error ? <span role="alert" className="text-xs text-danger">Not saved: {save.error.message}</span> : null}
    </form>
  );
}
