/**
 * oscillator: Euclidean lattice path integral of the harmonic oscillator on a periodic
 * time lattice (Creutz & Freedman 1981), with the action
 *   S = Σ_i a [ (m/2)((x_{i+1} − x_i)/a)² + (m ω²/2) x_i² ],   x_N ≡ x_0,
 * sampled by Metropolis: each sweep visits the sites in order and makes `hits` proposals
 * x' = x + step·(2u − 1) at each. Cold start (all x = 0).
 * acceptance = accepted / attempted proposals over the sweeps since the previous
 * measurement (since the start for the first one).
 */
import type { OscillatorParams } from "../../lib/samplers/schemas";
import { uniform01 } from "../../lib/samplers/rng";
import { decodeTyped, encodeTyped, type CoreFactory } from "./core";

const TWO32 = 4294967296;

/** Lattice action S of a periodic path. */
export function oscillatorAction(x: Float64Array, a: number, m: number, omega: number): number {
  const N = x.length;
  let kin = 0;
  let pot = 0;
  for (let i = 0; i < N; i++) {
    const dx = x[i === N - 1 ? 0 : i + 1] - x[i];
    kin += dx * dx;
    pot += x[i] * x[i];
  }
  return (m / (2 * a)) * kin + ((a * m * omega * omega) / 2) * pot;
}

/** Build an oscillator core (see the file comment). */
export const createOscillator: CoreFactory = (raw, rng) => {
  const p = raw as unknown as Required<OscillatorParams>;
  const { N, a, m, omega, step, hits } = p;
  const x = new Float64Array(N);
  // The part of S that depends on x_i is A·x_i² − B·x_i with A, B below.
  const A = m / a + (a * m * omega * omega) / 2;
  const kB = m / a;
  let accepted = 0;
  let attempted = 0;

  return {
    observables: ["x2", "action", "acceptance"],
    workPerSweep: N * hits,
    init() {
      x.fill(0);
      accepted = 0;
      attempted = 0;
    },
    sweep() {
      let acc = 0;
      for (let i = 0; i < N; i++) {
        const B = kB * (x[i === 0 ? N - 1 : i - 1] + x[i === N - 1 ? 0 : i + 1]);
        let xi = x[i];
        for (let h = 0; h < hits; h++) {
          const xn = xi + step * (2 * uniform01(rng) - 1);
          const dS = A * (xn * xn - xi * xi) - B * (xn - xi);
          if (dS <= 0 || rng.next() >>> 0 < Math.exp(-dS) * TWO32) {
            xi = xn;
            acc++;
          }
        }
        x[i] = xi;
      }
      accepted += acc;
      attempted += N * hits;
    },
    measure(out) {
      let s2 = 0;
      for (let i = 0; i < N; i++) s2 += x[i] * x[i];
      out[0] = s2 / N;
      out[1] = oscillatorAction(x, a, m, omega) / N;
      out[2] = attempted === 0 ? 0 : accepted / attempted;
      accepted = 0;
      attempted = 0;
    },
    saveState: () => ({ x: encodeTyped(x), accepted, attempted }),
    loadState(state) {
      decodeTyped(state.x, x, "oscillator path");
      if (!Number.isInteger(state.accepted) || !Number.isInteger(state.attempted)) {
        throw new Error("checkpoint: oscillator acceptance counters missing");
      }
      accepted = state.accepted as number;
      attempted = state.attempted as number;
    },
    extraFiles: () => [],
  };
};
