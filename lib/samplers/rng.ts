/**
 * Seed -> random number generator for the built-in samplers.
 *
 * Generator: xoroshiro128+ (Blackman & Vigna 2018) as implemented by the pure-rand
 * package, used through its mutating `next()` (32-bit outputs, the low half of the
 * 64-bit sum). Its state is 128 bits; we fill it from the run's 64-bit seed with
 * SplitMix64 (Steele, Lea & Flood 2014), the seeding that the generator's authors
 * recommend, so that nearby seeds (1, 2, 3, ...) give unrelated streams.
 *
 * seedToState(seed):
 *   x  = seed (unsigned 64-bit integer)
 *   s0 = splitmix64(x += 0x9e3779b97f4a7c15)
 *   s1 = splitmix64(x += 0x9e3779b97f4a7c15)
 *   state = [hi32(s0), lo32(s0), hi32(s1), lo32(s1)]  (pure-rand's layout, int32 words)
 */
import { xoroshiro128plusFromState } from "pure-rand/generator/xoroshiro128plus";
import type { JumpableRandomGenerator } from "pure-rand/types/JumpableRandomGenerator";

export type Rng = JumpableRandomGenerator;

const MASK64 = (1n << 64n) - 1n;
const GOLDEN = 0x9e3779b97f4a7c15n;

/** Parse an unsigned 64-bit decimal seed string; throws with a reason when it is not one. */
export function parseSeed(seed: string): bigint {
  if (typeof seed !== "string" || !/^(0|[1-9][0-9]{0,19})$/.test(seed)) {
    throw new RangeError(`seed must be an unsigned 64-bit integer as a decimal string (got ${JSON.stringify(seed)})`);
  }
  const v = BigInt(seed);
  if (v > MASK64) throw new RangeError(`seed ${seed} exceeds 2^64-1`);
  return v;
}

/** One SplitMix64 output for counter value z (already advanced by the caller). */
export function splitmix64Mix(z: bigint): bigint {
  z = ((z ^ (z >> 30n)) * 0xbf58476d1ce4e5b9n) & MASK64;
  z = ((z ^ (z >> 27n)) * 0x94d049bb133111ebn) & MASK64;
  return z ^ (z >> 31n);
}

/** The xoroshiro128+ state (pure-rand word order) derived from a 64-bit seed string via SplitMix64. */
export function seedToState(seed: string): number[] {
  let x = parseSeed(seed);
  x = (x + GOLDEN) & MASK64;
  const s0 = splitmix64Mix(x);
  x = (x + GOLDEN) & MASK64;
  const s1 = splitmix64Mix(x);
  const words = [s0 >> 32n, s0 & 0xffffffffn, s1 >> 32n, s1 & 0xffffffffn].map((w) => Number(BigInt.asIntN(32, w)));
  // An all-zero state is the generator's one fixed point; SplitMix64 makes it practically unreachable.
  if (!words.some((w) => w !== 0)) words[3] = 1;
  return words;
}

/** A fresh generator for a run's seed string. */
export function createRng(seed: string): Rng {
  return xoroshiro128plusFromState(seedToState(seed));
}

/** Rebuild a generator from `rng.getState()` (used by checkpoints). */
export function rngFromState(state: readonly number[]): Rng {
  if (!Array.isArray(state) || state.length !== 4 || !state.every((w) => Number.isInteger(w))) {
    throw new TypeError("RNG state must be four integer words");
  }
  return xoroshiro128plusFromState(state);
}

const TWO_POW_26 = 67108864;
const TWO_POW_M53 = 1 / 9007199254740992;

/**
 * Uniform double in [0, 1) with 53 random bits. Written here rather than using
 * pure-rand's uniformFloat64 because that one takes the *low* bits of each output,
 * the weakest bits of xoroshiro128+; we take the high 27 + 26 bits instead.
 */
export function uniform01(rng: Rng): number {
  const a = rng.next() >>> 5;
  const b = rng.next() >>> 6;
  return (a * TWO_POW_26 + b) * TWO_POW_M53;
}

/** Uniform 32-bit unsigned integer. */
export function uint32(rng: Rng): number {
  return rng.next() >>> 0;
}
