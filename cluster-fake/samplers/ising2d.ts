/**
 * ising2d: square-lattice Ising model, periodic L×L, J=1, H = −Σ⟨ij⟩ s_i s_j.
 *
 * metropolis: single-spin Metropolis (Metropolis et al. 1953); one sweep = L² attempts,
 *   visiting sites row by row ("sequential") or all even then all odd sites ("checkerboard").
 * wolff: Wolff (1989) single-cluster update, bond probability p = 1 − exp(−2/T).
 *   With params.clusters given, one sweep = that many clusters throughout. Without it,
 *   during thermalization one sweep = clusters grown until at least L² spins were flipped
 *   in total (a sweep-equivalent), and from the first measurement sweep on one sweep = a
 *   FIXED number of clusters round(L²/⟨cluster size⟩), the mean measured over the
 *   thermalization (1 cluster if thermalization is 0). The count must be
 *   fixed: stopping on "≥ L² spins flipped" picks measurement times that depend on the
 *   cluster sizes just drawn and biases the measured distribution (seen at 4×4, T=1.5).
 * The start configuration is params.start ("cold": all +1, "hot": random), recorded in the
 * manifest's params.
 */
import type { Ising2dParams } from "../../lib/samplers/schemas";
import type { Rng } from "../../lib/samplers/rng";
import { decodeTyped, encodeTyped, type CoreFactory, type SamplerCore } from "./core";

const TWO32 = 4294967296;

/**
 * One row-by-row Metropolis sweep. Index math instead of neighbour tables (the lattice
 * and one row stay in cache); thresholds are 32-bit integers so that one generator
 * output decides a move; moves with dE ≤ 0 draw no random number, as in the C peer.
 */
export function metropolisSweepSequential(s: Int8Array, L: number, thr: Float64Array, rng: Rng): void {
  const N = L * L;
  for (let row = 0; row < N; row += L) {
    const up = row === 0 ? N - L : row - L;
    const dn = row === N - L ? 0 : row + L;
    for (let x = 0; x < L; x++) {
      const i = row + x;
      const nb =
        s[x === 0 ? i + L - 1 : i - 1] + s[x === L - 1 ? i - L + 1 : i + 1] + s[up + x] + s[dn + x];
      const d = s[i] * nb; // dE = 2d
      if (d <= 0 || rng.next() >>> 0 < thr[d]) s[i] = -s[i];
    }
  }
}

/** One checkerboard Metropolis sweep: sites with (x+y) even, then odd. */
export function metropolisSweepCheckerboard(s: Int8Array, L: number, thr: Float64Array, rng: Rng): void {
  const N = L * L;
  for (let parity = 0; parity < 2; parity++) {
    for (let row = 0, y = 0; row < N; row += L, y++) {
      const up = row === 0 ? N - L : row - L;
      const dn = row === N - L ? 0 : row + L;
      for (let x = (y + parity) & 1; x < L; x += 2) {
        const i = row + x;
        const nb =
          s[x === 0 ? i + L - 1 : i - 1] + s[x === L - 1 ? i - L + 1 : i + 1] + s[up + x] + s[dn + x];
        const d = s[i] * nb;
        if (d <= 0 || rng.next() >>> 0 < thr[d]) s[i] = -s[i];
      }
    }
  }
}

/** Grow and flip one Wolff cluster from a random seed site; returns its size. */
export function wolffCluster(s: Int8Array, L: number, pAdd32: number, stack: Int32Array, rng: Rng): number {
  const N = L * L;
  // Multiply-shift maps 32 bits to [0, N); its bias (< N/2^32) is far below any statistical error.
  const seed = Math.floor(((rng.next() >>> 0) * N) / TWO32);
  const s0 = s[seed];
  s[seed] = -s0; // flipping on adding marks the site as visited
  stack[0] = seed;
  let sp = 1;
  let size = 1;
  while (sp > 0) {
    const j = stack[--sp];
    const x = j % L;
    const l = x === 0 ? j + L - 1 : j - 1;
    const r = x === L - 1 ? j - L + 1 : j + 1;
    const u = j < L ? j + N - L : j - L;
    const d = j >= N - L ? j - N + L : j + L;
    if (s[l] === s0 && rng.next() >>> 0 < pAdd32) { s[l] = -s0; stack[sp++] = l; size++; }
    if (s[r] === s0 && rng.next() >>> 0 < pAdd32) { s[r] = -s0; stack[sp++] = r; size++; }
    if (s[u] === s0 && rng.next() >>> 0 < pAdd32) { s[u] = -s0; stack[sp++] = u; size++; }
    if (s[d] === s0 && rng.next() >>> 0 < pAdd32) { s[d] = -s0; stack[sp++] = d; size++; }
  }
  return size;
}

/** Energy per site and magnetisation per site of a configuration. */
export function isingEnergyMagnetisation(s: Int8Array, L: number): { e: number; m: number } {
  const N = L * L;
  let bonds = 0;
  let mag = 0;
  for (let row = 0; row < N; row += L) {
    const dn = row === N - L ? 0 : row + L;
    for (let x = 0; x < L; x++) {
      const si = s[row + x];
      bonds += si * (s[x === L - 1 ? row : row + x + 1] + s[dn + x]);
      mag += si;
    }
  }
  return { e: -bonds / N, m: mag / N };
}

/** Build an ising2d core (see the file comment for the algorithms). */
export const createIsing2d: CoreFactory = (raw, rng) => {
  const p = raw as unknown as Required<Ising2dParams>;
  const L = p.L;
  const N = L * L;
  const spins = new Int8Array(N);
  // thr[d] for d = s_i·(sum of neighbours) ∈ {2, 4}: accept if u32 < exp(−2d/T)·2^32.
  const thr = new Float64Array(5);
  thr[2] = Math.exp(-4 / p.T) * TWO32;
  thr[4] = Math.exp(-8 / p.T) * TWO32;
  const pAdd32 = -Math.expm1(-2 / p.T) * TWO32;
  const stack = p.algorithm === "wolff" ? new Int32Array(N) : new Int32Array(0);
  // Wolff bookkeeping (see the file comment): clusters per measurement sweep, once fixed,
  // and the thermalization tallies that set its default.
  let clustersPerSweep = p.clusters ?? 0;
  let thermClusters = 0;
  let thermSpins = 0;
  const sweep =
    p.algorithm === "wolff"
      ? () => {
          if (clustersPerSweep > 0) {
            for (let c = 0; c < clustersPerSweep; c++) wolffCluster(spins, L, pAdd32, stack, rng);
            return;
          }
          let flipped = 0;
          while (flipped < N) {
            flipped += wolffCluster(spins, L, pAdd32, stack, rng);
            thermClusters++;
          }
          thermSpins += flipped;
        }
      : p.sweep === "checkerboard"
        ? () => metropolisSweepCheckerboard(spins, L, thr, rng)
        : () => metropolisSweepSequential(spins, L, thr, rng);

  const core: SamplerCore & { spins: Int8Array; clustersPerSweep(): number } = {
    observables: ["e", "absM", "m2", "m4"],
    workPerSweep: N,
    spins,
    clustersPerSweep: () => clustersPerSweep,
    init() {
      if (p.start === "hot") for (let i = 0; i < N; i++) spins[i] = rng.next() < 0 ? -1 : 1;
      else spins.fill(1);
    },
    startMeasuring() {
      if (p.algorithm === "wolff" && clustersPerSweep === 0) {
        clustersPerSweep = thermClusters === 0 ? 1 : Math.max(1, Math.round((N * thermClusters) / thermSpins));
      }
    },
    sweep,
    measure(out) {
      const { e, m } = isingEnergyMagnetisation(spins, L);
      const m2 = m * m;
      out[0] = e;
      out[1] = Math.abs(m);
      out[2] = m2;
      out[3] = m2 * m2;
    },
    saveState: () => ({ spins: encodeTyped(spins), clustersPerSweep, thermClusters, thermSpins }),
    loadState(state) {
      decodeTyped(state.spins, spins, "ising2d spins");
      for (const k of ["clustersPerSweep", "thermClusters", "thermSpins"] as const) {
        if (!Number.isInteger(state[k])) throw new Error(`checkpoint: ising2d ${k} missing`);
      }
      clustersPerSweep = state.clustersPerSweep as number;
      thermClusters = state.thermClusters as number;
      thermSpins = state.thermSpins as number;
      for (let i = 0; i < N; i++) {
        if (spins[i] !== 1 && spins[i] !== -1) throw new Error(`checkpoint: ising2d spin ${i} is ${spins[i]}`);
      }
    },
    extraFiles: () => [],
  };
  return core;
};
