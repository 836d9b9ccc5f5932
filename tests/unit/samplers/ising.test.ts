// ising2d Monte Carlo against exact results. Tolerance: SIGMA (4) binning standard errors
// (helpers.ts); every run uses its own fixed seed, so the outcome is reproducible.
import { describe, expect, it } from "vitest";
import { SIGMA, binned, pull, runCore } from "./helpers";
import { TC, enumerate4x4, kaufmanEnergy, onsagerEnergy, yangMagnetisation } from "./ising-exact";

function expectClose(x: Float64Array, exact: number, tauGuess: number, what: string) {
  const est = binned(x, tauGuess);
  const msg = `${what}: measured ${est.mean.toFixed(5)} ± ${est.err.toExponential(2)} (tau ${est.tau.toFixed(1)}), exact ${exact.toFixed(5)}, pull ${pull(est, exact).toFixed(2)}`;
  console.log(msg);
  expect(Math.abs(est.mean - exact), msg).toBeLessThan(SIGMA * est.err);
}

const variants = [
  { algorithm: "metropolis", sweep: "sequential" },
  { algorithm: "metropolis", sweep: "checkerboard" },
  { algorithm: "wolff" },
  { algorithm: "wolff", clusters: 3 },
] as const;

describe("ising2d 4×4 vs exact enumeration of all 2^16 states", () => {
  for (const v of variants) {
    it.each([1.5, TC, 3.5])(`${v.algorithm}${"sweep" in v ? "/" + v.sweep : ""}${"clusters" in v ? `/${v.clusters} clusters` : ""} at T=%f: e, |m|, m²`, (T) => {
      const exact = enumerate4x4(T);
      const start = T > 3 ? "hot" : "cold";
      const s = runCore("ising2d", { L: 4, T, start, ...v }, { seed: "401", thermalization: 1000, measurements: 100_000 });
      for (const k of ["e", "absM", "m2"] as const) expectClose(s[k], exact[k], 5, `${k} at T=${T}`);
    });
  }
});

describe("ising2d energy near T_c vs Kaufman (1949) finite-lattice partition function", () => {
  it.each([
    [8, "metropolis", 10],
    [8, "wolff", 2],
    [16, "metropolis", 15],
    [16, "wolff", 2],
  ] as const)("L=%i %s at T_c", (L, algorithm, tauGuess) => {
    const s = runCore("ising2d", { L, T: TC, algorithm }, { seed: `8${L}`, thermalization: 2000, measurements: algorithm === "wolff" ? 40_000 : 80_000 });
    expectClose(s.e, kaufmanEnergy(L, TC), tauGuess, `e L=${L} ${algorithm}`);
  });
});

describe("ising2d L=64 vs Onsager (1944) energy and Yang (1952) magnetisation", () => {
  // At L=64 and T ≤ 2.0 or ≥ 3.0 the correlation length is a few sites, so finite-size
  // corrections (exponentially small in L/ξ) are far below the statistical errors.
  it("metropolis T=2.0 (ordered): e and |m|", () => {
    const s = runCore("ising2d", { L: 64, T: 2.0, algorithm: "metropolis" }, { seed: "64", thermalization: 500, measurements: 16_000 });
    expectClose(s.e, onsagerEnergy(2.0), 3, "e");
    expectClose(s.absM, yangMagnetisation(2.0), 3, "|m| vs Yang");
  });
  it("metropolis T=3.0 (disordered): e", () => {
    const s = runCore("ising2d", { L: 64, T: 3.0, algorithm: "metropolis", sweep: "checkerboard" }, { seed: "65", thermalization: 500, measurements: 16_000 });
    expectClose(s.e, onsagerEnergy(3.0), 3, "e");
  });
  it("wolff T=2.0 and T=3.0", () => {
    const lo = runCore("ising2d", { L: 64, T: 2.0, algorithm: "wolff" }, { seed: "66", thermalization: 200, measurements: 4000 });
    expectClose(lo.e, onsagerEnergy(2.0), 2, "e T=2");
    expectClose(lo.absM, yangMagnetisation(2.0), 2, "|m| T=2 vs Yang");
    const hi = runCore("ising2d", { L: 64, T: 3.0, algorithm: "wolff" }, { seed: "67", thermalization: 200, measurements: 6000 });
    expectClose(hi.e, onsagerEnergy(3.0), 2, "e T=3");
  });
});

describe("ising2d autocorrelation at T_c, L=32", () => {
  // Cluster updates beat critical slowing down (Wolff 1989): tau_int of |m| and e in
  // sweeps must be far below Metropolis's. A factor ≥ 5 is the common-practice bar; at
  // L=32 the measured ratio is much larger.
  it("Wolff tau_int is at least 5× below Metropolis", () => {
    const met = runCore("ising2d", { L: 32, T: TC, algorithm: "metropolis" }, { seed: "3201", thermalization: 5000, measurements: 100_000 });
    const wolff = runCore("ising2d", { L: 32, T: TC, algorithm: "wolff" }, { seed: "3202", thermalization: 1000, measurements: 30_000 });
    for (const k of ["absM", "e"] as const) {
      const tm = binned(met[k], 60).tau;
      const tw = binned(wolff[k], 3).tau;
      console.log(`tau_int(${k}) at T_c, L=32 (binning): metropolis ${tm.toFixed(1)}, wolff ${tw.toFixed(2)} sweeps; ratio ${(tm / tw).toFixed(1)}`);
      expect(tm / tw).toBeGreaterThanOrEqual(5);
    }
  });
});
