"use client";
import { useCallback, useEffect, useState } from "react";

const STORE = "ergodex.explorer.columns";

/** Which table columns are hidden, remembered in this browser (localStorage) across visits. */
export function useHiddenColumns(defaultHidden: string[]) {
  const [hidden, setHidden] = useState<string[]>(defaultHidden);
  useEffect(() => {
    try { const v = JSON.parse(localStorage.getItem(STORE) ?? "null"); if (Array.isArray(v)) setHidden(v.filter((x) => typeof x === "string")); } catch { /* a corrupt entry falls back to the default */ }
  }, []);
  const toggle = useCallback((id: string) => setHidden((h) => {
    const next = h.includes(id) ? h.filter((x) => x !== id) : [...h, id];
    localStorage.setItem(STORE, JSON.stringify(next));
    return next;
  }), []);
  return { hidden, toggle };
}

/** A small menu of checkboxes, one per column. */
export function ColumnChooser({ columns, hidden, onToggle }: { columns: { id: string; label: string }[]; hidden: string[]; onToggle: (id: string) => void }) {
  return (
    <details className="relative text-sm">
      <summary className="cursor-pointer rounded-md border border-line-strong bg-paper-raised px-3 py-1.5 font-medium hover:bg-paper-sunken list-none">Columns</summary>
      <div className="absolute right-0 z-10 mt-1 w-56 rounded-md border border-line bg-paper-raised p-2 shadow-md max-h-80 overflow-auto" role="group" aria-label="Visible columns">
        {columns.map((c) => (
          <label key={c.id} className="flex items-center gap-2 py-0.5">
            <input type="checkbox" checked={!hidden.includes(c.id)} onChange={() => onToggle(c.id)} aria-label={`show ${c.label}`} />
            <span className={c.id.startsWith("param:") ? "mono" : ""}>{c.label}</span>
          </label>
        ))}
      </div>
    </details>
  );
}
