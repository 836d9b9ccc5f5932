"use client";
import { useState } from "react";

/** Copies a text to the clipboard and says so for a moment. */
export function CopyButton({ text, label = "Copy" }: { text: string; label?: string }) {
  const [done, setDone] = useState(false);
  return (
    <button type="button" className="text-xs text-accent hover:underline" onClick={async () => {
      await navigator.clipboard?.writeText(text).catch(() => undefined);
      setDone(true);
      setTimeout(() => setDone(false), 1500);
    }}>{done ? "copied" : label}</button>
  );
}
