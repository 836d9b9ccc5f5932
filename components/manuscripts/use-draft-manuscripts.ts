"use client";
import { useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { ApiError, fetchJson } from "@/lib/hooks/fetch-json";

/** A draft the caller may add exhibits to (GET /api/v1/manuscripts, filtered). */
export type DraftManuscript = { id: string; title: string; groupId: string; groupName: string; exhibits: number };
/** What the explorer sends to put the current view into a manuscript. */
export type ViewToExhibit = { manuscript: DraftManuscript; label: string; caption: string | null; kind: "figure" | "table"; query: Record<string, unknown>; plot: Record<string, unknown> | null };

async function post<T>(url: string, body: unknown): Promise<T> {
  const res = await fetch(url, { method: "POST", credentials: "same-origin", headers: { "content-type": "application/json", accept: "application/json" }, body: JSON.stringify(body) });
  const b = await res.json().catch(() => null);
  if (!res.ok) {
    const e = (b as { error?: { code?: string; message?: string } } | null)?.error;
    throw new ApiError(res.status, e?.code ?? `http_${res.status}`, e?.message ?? `${url} answered ${res.status}`);
  }
  return (b as { data: T }).data;
}

/** The drafts the caller may edit, newest first. */
export function useDraftManuscripts() {
  return useQuery({
    queryKey: ["manuscripts", "editable-drafts"],
    queryFn: async ({ signal }) => (await fetchJson<{ data: (DraftManuscript & { mayEdit: boolean })[] }>("/api/v1/manuscripts", signal)).data.filter((m) => m.mayEdit),
  });
}

/** Save the view, shared with the manuscript's group, then add it as an exhibit (two calls: the view stays citable on its own). */
export function useAddViewToManuscript() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: async (v: ViewToExhibit) => {
      const view = await post<{ id: string }>("/api/v1/views", { name: `${v.manuscript.title} · ${v.label}`, query: v.query, groupId: v.manuscript.groupId, ...(v.plot ? { plot: v.plot } : {}) });
      const ex = await post<{ id: string; label: string }>(`/api/v1/manuscripts/${v.manuscript.id}/exhibits`, { label: v.label, caption: v.caption, kind: v.kind, viewId: view.id });
      return { ...ex, manuscript: v.manuscript };
    },
    onSuccess: () => qc.invalidateQueries({ queryKey: ["manuscripts"] }),
  });
}
