import { ClusterProtocolError } from "./errors";
import type { RunProgress } from "./types";

/**
 * One exec on the login node that reads, for many runs at once, what lives in the run folders
 * rather than in the scheduler: progress.json, the task markers written by the batch script,
 * and the tail of the task's error file. Not a scheduler query, so it is not rate limited like one.
 */

/** What the run folder says about one run. */
export interface RunFolderInfo {
  progress: RunProgress | null;
  /** Per dispatch token: the task that started it, and how it ended if it got that far. */
  tokens: Map<string, { jobId: string; groupId: string; index: number; startedAt: string; exitCode: number | null; finishedAt: string | null }>;
  stderrTail: string;
}

const sq = (s: string) => `'${s.replace(/'/g, `'\\''`)}'`;

/** The remote program: reads "runId<TAB>errFile|-" lines on stdin, answers tagged lines on stdout. */
export function inspectCommand(workRoot: string): string {
  const program = `cd ${sq(workRoot)} || exit 1
tab=$(printf '\\t')
while IFS="$tab" read -r id err; do
  printf 'R\\t%s\\n' "$id"
  if [ -f "$id/out/progress.json" ]; then printf 'P\\t'; tr -d '\\n\\t' < "$id/out/progress.json"; printf '\\n'; fi
  for f in "$id"/.ergodex/*.started "$id"/.ergodex/*.exit; do
    [ -f "$f" ] || continue
    printf 'M\\t%s\\t' "\${f##*/}"; head -n 1 "$f" | tr -d '\\n'; printf '\\n'
  done
  if [ "$err" != - ] && [ -f "$err" ]; then printf 'T\\t'; tail -c 4000 "$err" | base64 | tr -d '\\n'; printf '\\n'; fi
done`;
  return `/bin/sh -c ${sq(program)}`;
}

/** stdin for inspectCommand. */
export const inspectInput = (runs: { runId: string; errFile: string | null }[]): string =>
  runs.map((r) => `${r.runId}\t${r.errFile ?? "-"}\n`).join("");

function parseProgress(text: string): RunProgress | null {
  try {
    const p = JSON.parse(text) as Partial<RunProgress>;
    if (typeof p.sweepsDone === "number" && typeof p.sweepsTotal === "number" && typeof p.updatedAt === "string") {
      return { sweepsDone: p.sweepsDone, sweepsTotal: p.sweepsTotal, updatedAt: p.updatedAt };
    }
  } catch { /* a half-written file from a sampler without atomic writes: no progress this time */ }
  return null;
}

const iso = (s: string | undefined) => (s && /^\d+$/.test(s) ? new Date(Number(s) * 1000).toISOString() : null);

/** Parse the inspect program's output into one entry per run id. */
export function parseInspect(text: string): Map<string, RunFolderInfo> {
  const out = new Map<string, RunFolderInfo>();
  let cur: RunFolderInfo | null = null;
  text.split("\n").forEach((line, i) => {
    if (line === "") return;
    const [tag, ...rest] = line.split("\t");
    if (tag === "R") {
      cur = { progress: null, tokens: new Map(), stderrTail: "" };
      out.set(rest[0], cur);
      return;
    }
    if (!cur) throw new ClusterProtocolError(`run-folder listing line ${i + 1} comes before any run: "${line.slice(0, 120)}"`);
    const info: RunFolderInfo = cur;
    if (tag === "P") info.progress = parseProgress(rest.join("\t"));
    else if (tag === "T") info.stderrTail = Buffer.from(rest[0] ?? "", "base64").toString("utf8");
    else if (tag === "M") {
      const [file, ...fields] = rest;
      const m = /^(.+)\.(started|exit)$/.exec(file ?? "");
      if (!m) return;
      const token = m[1];
      const t = info.tokens.get(token) ?? { jobId: "", groupId: "", index: -1, startedAt: "", exitCode: null, finishedAt: null };
      if (m[2] === "started") {
        const [jobId, groupId, index, at] = fields;
        Object.assign(t, { jobId: jobId ?? "", groupId: groupId ?? "", index: Number(index ?? -1), startedAt: iso(at) ?? "" });
      } else {
        const [code, at] = fields;
        t.exitCode = /^\d+$/.test(code ?? "") ? Number(code) : null;
        t.finishedAt = iso(at);
      }
      info.tokens.set(token, t);
    } else {
      throw new ClusterProtocolError(`run-folder listing line ${i + 1} has an unknown tag "${tag}"`);
    }
  });
  return out;
}
