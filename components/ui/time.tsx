"use client";
import { utc } from "@/lib/format";

/** A time in the viewer's zone, with UTC on hover. */
export function Time({ at }: { at: string | Date }) {
  const d = new Date(at);
  return <time dateTime={d.toISOString()} title={utc(d)} suppressHydrationWarning>{d.toLocaleString(undefined, { dateStyle: "medium", timeStyle: "short" })}</time>;
}
