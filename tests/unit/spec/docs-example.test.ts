// The example in docs/ensemble-spec.md parses and expands as the page says.
import fs from "node:fs";
import { describe, expect, it } from "vitest";
import { expandSpec, parseSpec } from "@/lib/spec";

describe("docs/ensemble-spec.md example", () => {
  it("is a valid spec of 3 × 8 points × 4 replicas = 96 runs, numbered with the last axis fastest", () => {
    const page = fs.readFileSync("docs/ensemble-spec.md", "utf8");
    const yaml = /```yaml\n([\s\S]*?)```/.exec(page)![1];
    const spec = parseSpec(yaml);
    const { points, runs } = expandSpec(spec);
    expect(points).toHaveLength(24);
    expect(runs).toHaveLength(96);
    expect(points[0].params).toMatchObject({ L: 8, T: 2.2 });
    expect(points[1].params).toMatchObject({ L: 8, T: 2.22 });
    expect(points[8].params).toMatchObject({ L: 16, T: 2.2 });
    expect(points[7].params.T).toBe(2.34);
    // 1 core × 120 min = 2 core-hours per run, as the page states
    expect(spec.resources.cores * spec.resources.wallMinutes / 60 * runs.length).toBe(192);
  });
});
