// Gamma method on a 2^20-point series against one fft.js FFT of the same length, same run.
// Run: npx tsx bench/gamma.ts   (prints figures; not part of the test suite)
import FFT from "fft.js";
import { uniformFloat64 } from "pure-rand/distribution/uniformFloat64";
import { xoroshiro128plus } from "pure-rand/generator/xoroshiro128plus";
import { gammaMethod } from "../lib/analysis/gamma";

const N = 1 << 20;
const WARMUP = 3;
const REPEATS = 15;

// AR(1) with φ = 0.9, so the window search and ACF are realistic (τ_int ≈ 9.5).
const rng = xoroshiro128plus(2024);
const x = new Float64Array(N);
for (let t = 1; t < N; t++) x[t] = 0.9 * x[t - 1] + (uniformFloat64(rng) - 0.5);

// Reference FFTs; the FFT object is built once (table construction excluded), as the library
// memoises its instances too.
const fft = new FFT(N);
const complexIn = new Float64Array(2 * N);
for (let i = 0; i < N; i++) complexIn[2 * i] = x[i];
const out = new Float64Array(2 * N);

const contenders = {
  gamma: () => gammaMethod(x),
  complex: () => fft.transform(out, complexIn),
  real: () => fft.realTransform(out, x),
};
type Name = keyof typeof contenders;

// The machine is shared: contenders run interleaved, so a burst of foreign load hits all of
// them in the same repetition, and the ratio is taken per repetition before the median.
const times: Record<Name, number[]> = { gamma: [], complex: [], real: [] };
for (let r = 0; r < WARMUP + REPEATS; r++) {
  for (const name of Object.keys(contenders) as Name[]) {
    const t0 = performance.now();
    contenders[name]();
    if (r >= WARMUP) times[name].push(performance.now() - t0);
  }
}
const median = (a: number[]) => [...a].sort((p, q) => p - q)[Math.floor(a.length / 2)];
const ratio = (a: Name, b: Name) => median(times[a].map((t, i) => t / times[b][i]));

const result = gammaMethod(x);
const fmt = (ms: number) => `${ms.toFixed(1).padStart(7)} ms`;
console.log(`series length n = 2^20 = ${N}; median of ${REPEATS} interleaved runs after ${WARMUP} warm-ups; node ${process.version}`);
console.log(`gammaMethod (Wolff window)       ${fmt(median(times.gamma))}   τ_int = ${result.tauInt.toFixed(2)} ± ${result.tauIntError.toFixed(2)}, W = ${result.window}`);
console.log(`fft.js transform, complex 2^20   ${fmt(median(times.complex))}`);
console.log(`fft.js realTransform, real 2^20  ${fmt(median(times.real))}`);
console.log(`ratio gamma / complex FFT        ${ratio("gamma", "complex").toFixed(2).padStart(7)}   (target < 4)`);
console.log(`ratio gamma / real FFT           ${ratio("gamma", "real").toFixed(2).padStart(7)}`);
