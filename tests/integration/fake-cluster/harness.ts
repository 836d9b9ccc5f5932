import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import ssh2 from "ssh2";
import { generateSshKeyPair } from "@/lib/ssh/generate-key-pair";
import { startFakeCluster, type FakeCluster } from "@/cluster-fake/server/server";
import type { FakeClusterOptions } from "@/cluster-fake/server/config";
import { authorizedKeysPath } from "@/cluster-fake/server/keys";
import { FakeClusterAdapter, sshKeyFingerprint, type FakeClusterAdapterOptions } from "@/broker/adapters/fake-cluster-adapter";
import type { ClusterAdapter, RunStatus } from "@/broker/adapters/types";

export const FIXTURE_SAMPLER = path.join(import.meta.dirname, "fixtures", "fake-sampler.mjs");
export const FIXTURE_COMMAND = [process.execPath, FIXTURE_SAMPLER, "{sampler}", "{runJson}", "{outDir}"];

/** A fresh state dir with one authorized client key. */
export function makeStateDir(): { stateDir: string; clientKey: string; cleanup: () => void } {
  const stateDir = fs.mkdtempSync(path.join(os.tmpdir(), "ergodex-fc-"));
  const pair = generateSshKeyPair("ergodex-test");
  fs.writeFileSync(authorizedKeysPath(stateDir), `# test client\n${pair.public}\n`);
  return { stateDir, clientKey: pair.private, cleanup: () => fs.rmSync(stateDir, { recursive: true, force: true }) };
}

/** Start the node in-process on a random port with the fixture sampler. */
export function startNode(stateDir: string, o: FakeClusterOptions = {}): Promise<FakeCluster> {
  return startFakeCluster({ port: 0, stateDir, samplerCommand: FIXTURE_COMMAND, killGraceMs: 1000, ...o });
}

/** An adapter pinned to the node's real host key. */
export function adapterFor(node: { port: number; hostPublicKey: string }, privateKey: string,
  o: Partial<FakeClusterAdapterOptions> = {}): FakeClusterAdapter {
  return new FakeClusterAdapter({
    host: "127.0.0.1", port: node.port, username: "ergodex", privateKey,
    hostKeyFingerprint: sshKeyFingerprint(node.hostPublicKey),
    reconnect: { initialDelayMs: 50, maxDelayMs: 400, maxAttempts: 8 },
    ...o,
  });
}

/** A run.json for the fixture sampler; params steer its behaviour (sweepMs, failAt, ignoreSigterm). */
export function runJson(runId: string, params: Record<string, unknown> = {}, sweeps = { thermalization: 5, measurements: 20 }) {
  return {
    format: "ergodex.run/1", runId, sampler: { name: "fixture", version: "0.0.0" },
    params: { sweepMs: 10, ...params }, seed: "12345678901234567890", ...sweeps, interval: 1,
  };
}

export const RES = { cores: 1, wallSeconds: 30, memoryMb: 256 };

/**
 * Poll status until pred holds. The deadline only guards against a hang; it is not a
 * timing assertion, and the error shows the last status seen.
 */
export async function waitForStatus(adapter: ClusterAdapter, runIds: string[], pred: (s: RunStatus[]) => boolean,
  deadlineMs = 15_000): Promise<RunStatus[]> {
  const until = Date.now() + deadlineMs;
  let last: RunStatus[] = [];
  while (Date.now() < until) {
    last = await adapter.status(runIds);
    if (pred(last)) return last;
    await new Promise((r) => setTimeout(r, 50));
  }
  throw new Error(`condition not reached; last status: ${JSON.stringify(last.map((s) => [s.runId, s.state, s.progress]))}`);
}

export const byId = (list: RunStatus[]) => new Map(list.map((s) => [s.runId, s]));

export const TERMINAL = new Set(["exited", "timed_out", "cancelled", "lost"]);
