// POST /api/v1/imports with Accept: application/x-ndjson over HTTP: the import's progress streams
// line by line (received → per bundle its steps, then its outcome → result); without the header the
// answer is one JSON document as before (what `ergodex deposit` reads, tested in http.test.ts).
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { base } from "../../support/http";
import { cleanupTemp, copyBundle, editCsv } from "../importer/bundles";
import { demoToken, filesOf, goodBundle, randomSeed, uploadCounts, zipOf } from "./support";

let token: string;
const seed = randomSeed;
afterAll(cleanupTemp);
beforeAll(async () => {
  token = await demoToken("researcher", "progress test");
});

type Line = { type: string; index?: number; total?: number; stage?: string; bundle?: string; bundles?: number; outcome?: { status: string; bundle: string }; data?: { bundles: { status: string }[]; accepted: number } };

/** POST and read the body chunk by chunk as it arrives, keeping each line and the chunk it came in. */
async function postStreaming(body: BodyInit, accept?: string) {
  const headers: Record<string, string> = { authorization: `Bearer ${token}`, "content-type": "application/zip", "x-file-name": "three.zip" };
  if (accept) headers.accept = accept;
  const res = await fetch(`${base}/api/v1/imports`, { method: "POST", headers, body });
  const reader = res.body!.getReader();
  const decoder = new TextDecoder();
  let text = "";
  let chunks = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    chunks++;
    text += decoder.decode(value, { stream: true });
  }
  return { res, text, chunks };
}

async function threeBundles(): Promise<BodyInit> {
  const bad = copyBundle(goodBundle(seed()));
  editCsv(bad, (l) => { const c = l[4].split(","); c[2] = "NaN"; l[4] = c.join(","); });
  return new Uint8Array(await zipOf([...filesOf(goodBundle(seed()), "a/"), ...filesOf(bad, "b/"), ...filesOf(goodBundle(seed(), undefined, 400), "c/")]));
}

describe("streamed import progress", () => {
  it("a line per step of each bundle, each bundle's outcome as it is done, then the result; lines arrive as they happen", async () => {
    const before = await uploadCounts();
    const { res, text, chunks } = await postStreaming(await threeBundles(), "application/x-ndjson");
    expect(res.status).toBe(200);
    expect(res.headers.get("content-type")).toMatch(/^application\/x-ndjson/);
    const lines = text.trim().split("\n").map((l) => JSON.parse(l) as Line);
    expect(lines[0]).toMatchObject({ type: "received", bundles: 3, refusedEarly: 0 });
    expect(lines.at(-1)!.type).toBe("result");
    const result = lines.at(-1)!.data!;
    expect(result.bundles.map((b) => b.status)).toEqual(["accepted", "refused", "accepted"]);
    // Per bundle, in order: checking, (importing, estimates when it gets that far), then its outcome.
    const perBundle = [0, 1, 2].map((i) => lines.filter((l) => l.index === i).map((l) => (l.type === "outcome" ? `outcome:${l.outcome!.status}` : l.stage)));
    expect(perBundle).toEqual([
      ["checking", "importing", "estimates", "outcome:accepted"],
      ["checking", "outcome:refused"], // the NaN is found by the check before any row is written
      ["checking", "importing", "estimates", "outcome:accepted"],
    ]);
    expect(lines.filter((l) => l.type !== "received" && l.type !== "result").every((l) => l.total === 3)).toBe(true);
    // Streamed, not held back until the end (compression or buffering would deliver one chunk).
    expect(chunks).toBeGreaterThan(1);
    const after = await uploadCounts();
    expect(after.runs - before.runs).toBe(2);
  });

  it("without the header: one JSON answer (201) as API clients expect", async () => {
    const { res, text } = await postStreaming(await threeBundles());
    expect(res.status).toBe(201);
    const json = JSON.parse(text) as { data: { accepted: number; refused: number } };
    expect(json.data).toMatchObject({ accepted: 2, refused: 1 });
  });

  it("upload-level refusals keep their status with the header too (no stream is started)", async () => {
    const res = await fetch(`${base}/api/v1/imports`, { method: "POST", headers: { authorization: `Bearer ${token}`, "content-type": "application/json", accept: "application/x-ndjson" }, body: "{}" });
    expect(res.status).toBe(400);
    expect(((await res.json()) as { error: { message: string } }).error.message).toMatch(/content type "application\/json" is not accepted/);
  });
});
