// τ_int of a point estimate from its replicas' τ_int: the N-weighted mean (documented in docs/explorer.md).
// Replicas of one point run the same chain dynamics at the same parameters, so their τ_int estimate one
// quantity. Inverse-variance weights would be biased: the error of an estimated τ_int grows with τ_int
// itself (σ_τ² ≈ 2(2W+1)/N · τ², Madras and Sokal 1988), so 1/σ² weights favour replicas whose τ came
// out low. N-weights follow each replica's statistics without looking at its τ.

/** One replica's τ_int (null when its analysis gave none), its error (null when unknown) and its N. */
export type ReplicaTau = { tauInt: number | null; tauIntError: number | null; n: number };

/** The combination, or why there is none. */
export type CombinedTau = { tauInt: number; tauIntError: number | null } | { tauInt: null; tauIntError: null; why: string };

/**
 * τ̄ = Σ nᵢτᵢ / Σ nᵢ and, when every replica has an error, σ(τ̄) = sqrt(Σ (nᵢσᵢ)²) / Σ nᵢ (replicas are
 * independent chains). None when a replica has no τ_int: a mean over the others would misdescribe the point.
 */
export function combineTauInt(replicas: readonly ReplicaTau[]): CombinedTau {
  if (replicas.length === 0) return { tauInt: null, tauIntError: null, why: "no replicas" };
  const missing = replicas.filter((r) => r.tauInt === null).length;
  if (missing > 0) return { tauInt: null, tauIntError: null, why: `${missing} of ${replicas.length} replicas have no τ_int` };
  for (const [i, r] of replicas.entries()) {
    if (!Number.isFinite(r.tauInt) || !(r.n > 0)) throw new Error(`combineTauInt(replicas[${i}]): τ_int must be finite and n > 0, got ${JSON.stringify(r)}`);
  }
  const sn = replicas.reduce((a, r) => a + r.n, 0);
  const tauInt = replicas.reduce((a, r) => a + r.n * (r.tauInt as number), 0) / sn;
  const allErrors = replicas.every((r) => r.tauIntError !== null && Number.isFinite(r.tauIntError));
  const tauIntError = allErrors ? Math.sqrt(replicas.reduce((a, r) => a + (r.n * (r.tauIntError as number)) ** 2, 0)) / sn : null;
  return { tauInt, tauIntError };
}
