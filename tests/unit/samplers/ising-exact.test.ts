// Self-checks of the exact Ising references before the Monte Carlo tests rely on them.
import { describe, expect, it } from "vitest";
import { TC, enumerate4x4, kaufmanEnergy, onsagerEnergy, yangMagnetisation } from "./ising-exact";

describe("exact 2D Ising references", () => {
  // Kaufman (1949) against brute-force enumeration of all 2^16 states: two independent
  // computations of the same number; 1e-8 allows for the central-difference derivative.
  it.each([1.2, 1.8, TC, 2.8, 4.0])("Kaufman (1949) L=4 energy equals 4×4 enumeration at T=%f", (T) => {
    expect(Math.abs(kaufmanEnergy(4, T) - enumerate4x4(T).e)).toBeLessThan(1e-8);
  });

  // Onsager (1944) is Kaufman's L→∞ limit; at L=256 finite-size terms are far below 1e-7
  // away from T_c (correlation length of a few sites).
  it.each([1.8, 2.0, 2.6, 3.0])("Onsager (1944) energy equals Kaufman (1949) at L=256, T=%f", (T) => {
    expect(Math.abs(onsagerEnergy(T) - kaufmanEnergy(256, T))).toBeLessThan(1e-7);
  });

  // At T_c Onsager's energy per site is −√2 (Onsager 1944; value recalled from memory).
  it("Onsager energy at T_c is −√2", () => {
    expect(Math.abs(onsagerEnergy(TC * (1 + 1e-12)) + Math.SQRT2)).toBeLessThan(1e-6);
  });

  // Yang (1952) vanishes at and above T_c and tends to 1 at T → 0.
  it("Yang (1952) magnetisation limits", () => {
    expect(yangMagnetisation(TC * 1.01)).toBe(0);
    expect(yangMagnetisation(0.5)).toBeGreaterThan(0.99999);
    expect(yangMagnetisation(TC * 0.999)).toBeLessThan(0.6); // steep β=1/8 rise
  });
});
