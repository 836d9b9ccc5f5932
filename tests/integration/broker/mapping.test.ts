// The broker's pure mappings: per-run resources (with a cluster's wall-time limit), the cluster's
// failure vocabulary onto run failure reasons, and the run.json it stages.
import { describe, expect, it } from "vitest";
import { resourcesFor } from "@/broker/pipeline/dispatch";
import { reasonOf } from "@/broker/pipeline/poll";
import { buildRunInput } from "@/lib/runs/run-input";
import { attemptCoreHours } from "@/lib/runs/attempt-core-hours";
import type { Cluster } from "@/models";
import type { RunStatus } from "@/broker/adapters/types";

const cluster = (settings: Record<string, unknown>) => ({ settings }) as unknown as Cluster;
const status = (reason: string | null): RunStatus => ({ failure: reason ? { reason, detail: "" } : null } as unknown as RunStatus);

describe("resourcesFor", () => {
  const spec = { resources: { cores: 4, wallMinutes: 90, memoryMb: 2048 } };
  it("asks for the spec's cores, memory and wall time", () => {
    expect(resourcesFor(spec, cluster({}))).toEqual({ cores: 4, wallSeconds: 5400, memoryMb: 2048 });
  });
  it("caps the wall time at the cluster's own limit, never raises it", () => {
    expect(resourcesFor(spec, cluster({ maxWallSeconds: 600 })).wallSeconds).toBe(600);
    expect(resourcesFor(spec, cluster({ maxWallSeconds: 99_999 })).wallSeconds).toBe(5400);
    expect(resourcesFor(spec, cluster({ maxWallSeconds: "nonsense" })).wallSeconds).toBe(5400);
  });
});

describe("reasonOf", () => {
  it.each([
    ["nonzero_exit", "nonzero_exit"], ["killed_by_signal", "nonzero_exit"], ["launch_failed", "dispatch_failed"],
    ["wall_time_exceeded", "wall_time_exceeded"], ["node_lost", "node_lost"], ["unknown_to_cluster", "node_lost"],
  ])("%s → %s", (cluster, ours) => expect(reasonOf(status(cluster))).toBe(ours));
});

describe("buildRunInput", () => {
  const base = { run: { id: "3f0c2a4e-0000-4000-8000-000000000001", seed: "18446744073709551615" }, point: { params: { L: 8, T: 2.3 } }, sampler: { name: "ising2d", version: "1.0.0" } };
  it("writes DESIGN.md's run.json", () => {
    expect(buildRunInput({ ...base, spec: { thermalization: 10, measurements: 20, interval: 2 } })).toEqual({
      format: "ergodex.run/1", runId: base.run.id, sampler: base.sampler, params: { L: 8, T: 2.3 },
      seed: "18446744073709551615", thermalization: 10, measurements: 20, interval: 2,
    });
  });
  it("refuses a spec without measurements, naming the field", () => {
    expect(() => buildRunInput({ ...base, spec: { thermalization: 10 } })).toThrow(/run\.json of run .*\/measurements is required/);
  });
});

describe("attemptCoreHours", () => {
  it("is cores × elapsed hours, 0 for an attempt that never started", () => {
    expect(attemptCoreHours(2, "2025-12-01T10:00:00Z", "2025-12-01T11:30:00Z")).toBe(3);
    expect(attemptCoreHours(1, null, "2025-12-01T11:30:00Z")).toBe(0);
    expect(() => attemptCoreHours(0, null, null)).toThrow(/cores must be a positive integer/);
    expect(() => attemptCoreHours(1, "yesterday", "2025-12-01T11:30:00Z")).toThrow(/unreadable times/);
  });
});
