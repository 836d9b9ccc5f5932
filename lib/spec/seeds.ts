/**
 * Seeds of an ensemble's runs, derived from its master seed alone (the same spec always gives the
 * same seeds). Built on SplitMix64 (Steele, Lea & Flood 2014), whose output function is a bijection
 * of 64-bit integers; γ = 0x9e3779b97f4a7c15 is its increment, all arithmetic is mod 2^64:
 *
 *   masterKey(m)      = mix(m + γ)                   the first SplitMix64 output from state m
 *   pointKey(m, p)    = mix(masterKey(m) + (p+1)·γ)  output p+1 of SplitMix64 started at masterKey
 *   seed(m, p, r)     = mix(pointKey(m, p) + (r+1)·γ) output r+1 of SplitMix64 started at pointKey
 *
 * For one point the replica seeds are distinct outputs of one SplitMix64 stream (mix is a bijection
 * and (r+1)·γ differ for r < 2^64 since γ is odd); across points they are unrelated streams, so two
 * runs share a seed with probability about n²/2^65 (n = 10,000 runs: below 10⁻¹¹).
 */
import { parseSeed, splitmix64Mix } from "@/lib/samplers/rng";

const MASK64 = (1n << 64n) - 1n;
const GAMMA = 0x9e3779b97f4a7c15n;

/** The (k)-th SplitMix64 output (k ≥ 1) of the stream whose state starts at `state`. */
export function splitmix64Output(state: bigint, k: bigint): bigint {
  return splitmix64Mix((state + k * GAMMA) & MASK64);
}

function checkIndex(value: number, what: string): void {
  if (!Number.isSafeInteger(value) || value < 0) throw new RangeError(`${what} must be a non-negative integer (got ${value})`);
}

/** The seed (u64 decimal string) of replica `replica` at point `pointIndex`, from the master seed (u64 decimal string). */
export function deriveSeed(master: string, pointIndex: number, replica: number): string {
  checkIndex(pointIndex, "pointIndex");
  checkIndex(replica, "replica");
  const masterKey = splitmix64Output(parseSeed(master), 1n);
  const pointKey = splitmix64Output(masterKey, BigInt(pointIndex) + 1n);
  return splitmix64Output(pointKey, BigInt(replica) + 1n).toString();
}
