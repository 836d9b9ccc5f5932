// The ready example shown where people learn to submit: a small ising2d temperature scan
// across the critical point T_c = 2/ln(1+√2) ≈ 2.269 (Onsager 1944).

/** An ising2d temperature scan, ready to submit as it is. */
export const EXAMPLE_SPEC = {
  format: "ergodex.ensemble/1",
  name: "ising2d L=16 temperature scan",
  description: "Wolff updates across the critical temperature",
  sampler: { name: "ising2d", version: "1.0.0" },
  fixed: { L: 16, algorithm: "wolff" },
  scan: [{ param: "T", linear: { from: 2.0, to: 2.6, points: 7 } }],
  replicas: 2,
  thermalization: 1000,
  measurements: 10000,
  interval: 1,
  seed: "20260314",
  resources: { cores: 1, wallMinutes: 30, memoryMb: 256 },
  retry: { maxAttempts: 2, on: ["node_lost", "connection_lost"], resumeOnWallTime: true },
  notify: { onFailure: true, onDone: false },
  tags: ["ising2d", "critical-scan"],
} as const;

export const EXAMPLE_SPEC_JSON = JSON.stringify(EXAMPLE_SPEC, null, 2);
