/**
 * Exact results for the 2D Ising model (J = 1, k_B = 1) used as references by the tests:
 * enumeration of all 2^16 states of the 4×4 torus, Kaufman's (1949) finite-lattice
 * partition function, Onsager's (1944) energy per site and Yang's (1952) spontaneous
 * magnetisation.
 */

/** Critical temperature T_c = 2/ln(1+√2) (Onsager 1944; Kramers & Wannier 1941). */
export const TC = 2 / Math.log(1 + Math.SQRT2);

/** Exact ⟨e⟩, ⟨|m|⟩, ⟨m²⟩, ⟨m⁴⟩ per site of the periodic 4×4 lattice at temperature T, by enumeration. */
export function enumerate4x4(T: number): { e: number; absM: number; m2: number; m4: number } {
  const L = 4;
  const N = 16;
  let Z = 0, se = 0, sa = 0, s2 = 0, s4 = 0;
  for (let state = 0; state < 1 << N; state++) {
    const s = (i: number) => ((state >> i) & 1 ? 1 : -1);
    let E = 0;
    let M = 0;
    for (let y = 0; y < L; y++) {
      for (let x = 0; x < L; x++) {
        const si = s(y * L + x);
        E -= si * (s(y * L + ((x + 1) % L)) + s(((y + 1) % L) * L + x));
        M += si;
      }
    }
    const w = Math.exp(-(E + 2 * N) / T); // shifted by the ground state energy −2N
    const m = M / N;
    Z += w;
    se += w * (E / N);
    sa += w * Math.abs(m);
    s2 += w * m * m;
    s4 += w * m ** 4;
  }
  return { e: se / Z, absM: sa / Z, m2: s2 / Z, m4: s4 / Z };
}

// log|2cosh x| and log|2sinh x| with the sign of 2sinh x, stable for large |x|.
const log2cosh = (x: number) => Math.abs(x) + Math.log1p(Math.exp(-2 * Math.abs(x)));
const log2sinh = (x: number) => (x === 0 ? -Infinity : Math.abs(x) + Math.log(-Math.expm1(-2 * Math.abs(x))));

/**
 * ln Z of the periodic L×L lattice at coupling K = 1/T (Kaufman 1949):
 * Z = ½(2 sinh 2K)^{L²/2} Σ_{i=1..4} Z_i, with
 *   Z_1 = Π_{r=0}^{L−1} 2cosh(Lγ_{2r+1}/2),  Z_2 = Π 2sinh(Lγ_{2r+1}/2),
 *   Z_3 = Π_{r=0}^{L−1} 2cosh(Lγ_{2r}/2),    Z_4 = Π 2sinh(Lγ_{2r}/2),
 *   cosh γ_k = cosh 2K coth 2K − cos(πk/L) for k ≥ 1, and γ_0 = 2K + ln tanh K (signed).
 */
export function kaufmanLogZ(L: number, K: number): number {
  const c = Math.cosh(2 * K) / Math.tanh(2 * K);
  const gamma = (k: number) => (k === 0 ? 2 * K + Math.log(Math.tanh(K)) : Math.acosh(c - Math.cos((Math.PI * k) / L)));
  const terms: { log: number; sign: number }[] = [];
  for (const parity of [1, 0]) {
    let lc = 0;
    let ls = 0;
    let sign = 1;
    for (let r = 0; r < L; r++) {
      const g = gamma(2 * r + parity);
      lc += log2cosh((L * g) / 2);
      ls += log2sinh((L * g) / 2);
      if (g < 0) sign = -sign;
    }
    terms.push({ log: lc, sign: 1 }, { log: ls, sign });
  }
  const top = Math.max(...terms.map((t) => t.log));
  const sum = terms.reduce((acc, t) => acc + t.sign * Math.exp(t.log - top), 0);
  return Math.log(0.5) + ((L * L) / 2) * Math.log(2 * Math.sinh(2 * K)) + top + Math.log(sum);
}

/** Exact energy per site of the periodic L×L lattice, −(1/L²) d lnZ/dK (Kaufman 1949), by central difference. */
export function kaufmanEnergy(L: number, T: number): number {
  const K = 1 / T;
  const h = 1e-5 * K;
  return -(kaufmanLogZ(L, K + h) - kaufmanLogZ(L, K - h)) / (2 * h) / (L * L);
}

/** Complete elliptic integral of the first kind K(k) = π / (2·AGM(1, √(1−k²))). */
function ellipticK(k: number): number {
  let a = 1;
  let b = Math.sqrt(1 - k * k);
  for (let i = 0; i < 60 && Math.abs(a - b) > 1e-16 * a; i++) [a, b] = [(a + b) / 2, Math.sqrt(a * b)];
  return Math.PI / (2 * a);
}

/**
 * Energy per site of the infinite lattice (Onsager 1944; formula recalled from memory and
 * checked in the tests against Kaufman's partition function at large L):
 * u = −coth 2K [1 + (2/π)(2 tanh² 2K − 1) K(κ)], κ = 2 sinh 2K / cosh² 2K.
 */
export function onsagerEnergy(T: number): number {
  const K = 1 / T;
  const kappa = (2 * Math.sinh(2 * K)) / Math.cosh(2 * K) ** 2;
  return -(1 / Math.tanh(2 * K)) * (1 + (2 / Math.PI) * (2 * Math.tanh(2 * K) ** 2 - 1) * ellipticK(kappa));
}

/** Spontaneous magnetisation per site (Yang 1952): (1 − sinh(2/T)^−4)^{1/8} below T_c, 0 above. */
export function yangMagnetisation(T: number): number {
  const s = Math.sinh(2 / T);
  return T < TC ? (1 - s ** -4) ** 0.125 : 0;
}
