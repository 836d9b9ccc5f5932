/** The interface every built-in sampler core implements; the driver does the rest. */
import type { Rng } from "../../lib/samplers/rng";

/** A file the sampler adds to the result bundle beside the series. */
export interface ExtraFile {
  path: string;
  data: string;
}

/** One Markov chain (or stream of independent samples) that the driver advances sweep by sweep. */
export interface SamplerCore {
  /** Series columns after `sweep`, in order (DESIGN.md sampler table). */
  readonly observables: readonly string[];
  /** Elementary updates per sweep; the driver uses it to pace its clock checks. */
  readonly workPerSweep: number;
  /** Set the start configuration (fresh runs only; may draw random numbers). */
  init(): void;
  /** Called once when thermalization ends, before the first measurement sweep (fresh runs and resumes alike). */
  startMeasuring?(): void;
  /** Advance by one sweep. */
  sweep(): void;
  /** Write the observables of the current state into `out` (length = observables.length). */
  measure(out: Float64Array): void;
  /** Full mutable state except the RNG, JSON-serialisable, for checkpoints. */
  saveState(): Record<string, unknown>;
  /** Restore what saveState returned. */
  loadState(state: Record<string, unknown>): void;
  /** Extra bundle files, produced from the final state. */
  extraFiles(): ExtraFile[];
}

/** Builds a core; must not draw random numbers (init does), so a resume can restore the RNG first. */
export type CoreFactory = (params: Record<string, unknown>, rng: Rng) => SamplerCore;

/** Base64 of a typed array's bytes (exact round trip, for checkpoints). */
export function encodeTyped(a: Int8Array | Float64Array): string {
  return Buffer.from(a.buffer, a.byteOffset, a.byteLength).toString("base64");
}

/** Fill `into` from base64 written by encodeTyped; throws if the length differs. */
export function decodeTyped<T extends Int8Array | Float64Array>(b64: unknown, into: T, what: string): T {
  if (typeof b64 !== "string") throw new Error(`checkpoint: ${what} missing`);
  const buf = Buffer.from(b64, "base64");
  if (buf.byteLength !== into.byteLength) {
    throw new Error(`checkpoint: ${what} has ${buf.byteLength} bytes, expected ${into.byteLength}`);
  }
  new Uint8Array(into.buffer, into.byteOffset, into.byteLength).set(buf);
  return into;
}
