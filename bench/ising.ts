/**
 * ising2d Metropolis throughput against the C reference peer (../shared/peers/ising_metropolis.c).
 * Usage: npx tsx bench/ising.ts [L=64] [T=2.269] [sweeps=5000]
 * Both run the same L, T and sweeps in this process's run, with the same amount of work:
 * sequential single-spin sweeps from a cold start, energy measured over the second half.
 * Prints attempts/s of each and the ratio ours/C (target ≥ 0.5). Not part of the tests.
 * The three variants run interleaved REPS times and medians are printed, so that load from
 * other users of the machine hits all of them alike.
 */
import { execFileSync } from "node:child_process";
import fs from "node:fs";
import path from "node:path";
import { createIsing2d, isingEnergyMagnetisation } from "@/cluster-fake/samplers/ising2d";
import { createRng } from "@/lib/samplers/rng";

const repoRoot = path.resolve(import.meta.dirname, "..");
const peers = path.resolve(repoRoot, "../shared/peers");
const buildDir = path.join(repoRoot, "bench/.build");

const L = Number(process.argv[2] ?? 64);
const T = Number(process.argv[3] ?? 2.269);
const sweeps = Number(process.argv[4] ?? 5000);
if (!(Number.isInteger(L) && L >= 2 && T > 0 && Number.isInteger(sweeps) && sweeps >= 2)) {
  console.error("usage: npx tsx bench/ising.ts [L>=2] [T>0] [sweeps>=2]");
  process.exit(2);
}

const exe = path.join(buildDir, "ising_metropolis");
fs.mkdirSync(buildDir, { recursive: true });
execFileSync("gcc", ["-O2", "-o", exe, path.join(peers, "ising_metropolis.c"), "-lm"], { stdio: "inherit" });

function runPeer(): { attemptsPerSecond: number; energyPerSite: number } {
  return JSON.parse(execFileSync(exe, [String(L), String(T), String(sweeps), "12345"], { encoding: "utf8" }));
}

function runOurs(sweep: "sequential" | "checkerboard"): { attemptsPerSecond: number; energyPerSite: number } {
  const core = createIsing2d({ L, T, algorithm: "metropolis", sweep, start: "cold" }, createRng("12345"));
  core.init();
  const spins = (core as unknown as { spins: Int8Array }).spins;
  for (let i = 0; i < Math.max(50, sweeps / 50); i++) core.sweep(); // JIT warm-up, not timed
  spins.fill(1);
  const t0 = process.hrtime.bigint();
  let esum = 0;
  let n = 0;
  for (let s = 0; s < sweeps; s++) {
    core.sweep();
    if (s >= sweeps / 2) {
      esum += isingEnergyMagnetisation(spins, L).e;
      n++;
    }
  }
  const sec = Number(process.hrtime.bigint() - t0) / 1e9;
  return { attemptsPerSecond: (L * L * sweeps) / sec, energyPerSite: esum / n };
}

const REPS = 5;
const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];
const runs = { peer: [] as ReturnType<typeof runPeer>[], seq: [] as ReturnType<typeof runOurs>[], cb: [] as ReturnType<typeof runOurs>[] };
for (let r = 0; r < REPS; r++) {
  runs.peer.push(runPeer());
  runs.seq.push(runOurs("sequential"));
  runs.cb.push(runOurs("checkerboard"));
}
const pick = (rs: { attemptsPerSecond: number; energyPerSite: number }[]) => ({
  attemptsPerSecond: median(rs.map((x) => x.attemptsPerSecond)),
  energyPerSite: rs[0].energyPerSite,
});
const peer = pick(runs.peer);
const seq = pick(runs.seq);
const cb = pick(runs.cb);
const fmt = (x: number) => `${(x / 1e6).toFixed(1)} M/s`;
console.log(`ising2d Metropolis, L=${L}, T=${T}, ${sweeps} sweeps, median of ${REPS} (node ${process.version})`);
console.log(`  C peer (gcc -O2, xoshiro256**):      ${fmt(peer.attemptsPerSecond)}  e=${peer.energyPerSite.toFixed(4)}`);
console.log(`  ours sequential (xoroshiro128+):     ${fmt(seq.attemptsPerSecond)}  e=${seq.energyPerSite.toFixed(4)}`);
console.log(`  ours checkerboard (xoroshiro128+):   ${fmt(cb.attemptsPerSecond)}  e=${cb.energyPerSite.toFixed(4)}`);
console.log(`  ratio ours/C: sequential ${(seq.attemptsPerSecond / peer.attemptsPerSecond).toFixed(2)}, checkerboard ${(cb.attemptsPerSecond / peer.attemptsPerSecond).toFixed(2)} (target ≥ 0.5)`);
