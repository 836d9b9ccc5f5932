"use client";
import { useEffect, useRef, useState } from "react";

type Issue = { path: string; message: string };
type Result<T> = { data: T } | { error: { code: string; message: string; issues?: Issue[] } };

/** What the live validation shows: nothing yet, checking, the preview, or the problems with their paths. */
export type PreviewState<T> =
  | { status: "idle" }
  | { status: "checking"; last?: PreviewState<T> }
  | { status: "ok"; data: T }
  | { status: "error"; message: string; code: string; issues: Issue[] };

/**
 * Live validation: the spec is previewed by a server action after a pause in typing. Answers to
 * older inputs are dropped, so a slow answer never overwrites a newer one.
 */
export function useSpecPreview<T>(input: unknown, preview: (i: { spec: unknown }) => Promise<Result<T>>, delayMs = 450): PreviewState<T> {
  const [state, setState] = useState<PreviewState<T>>({ status: "idle" });
  const seq = useRef(0);
  const key = typeof input === "string" ? input : JSON.stringify(input);
  useEffect(() => {
    if (key === undefined || key === "" || key === '""') { setState({ status: "idle" }); return; }
    const mine = ++seq.current;
    const t = setTimeout(async () => {
      setState((s) => ({ status: "checking", last: s.status === "checking" ? s.last : s }));
      try {
        const r = await preview({ spec: typeof input === "string" ? input : JSON.parse(key) });
        if (mine !== seq.current) return;
        setState("data" in r ? { status: "ok", data: r.data } : { status: "error", message: r.error.message, code: r.error.code, issues: r.error.issues ?? [] });
      } catch (err) {
        if (mine !== seq.current) return;
        setState({ status: "error", code: "network", message: `the check did not answer (${(err as Error).message}); it is tried again when you edit`, issues: [] });
      }
    }, delayMs);
    return () => clearTimeout(t);
    // eslint-disable-next-line react-hooks/exhaustive-deps -- `key` stands for `input`
  }, [key, preview, delayMs]);
  return state;
}
