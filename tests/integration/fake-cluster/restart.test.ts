import fs from "node:fs";
import path from "node:path";
import { spawn, type ChildProcess } from "node:child_process";
import { pathToFileURL } from "node:url";
import { afterAll, describe, expect, it } from "vitest";
import type { FakeCluster } from "@/cluster-fake/server/server";
import { sshKeyFingerprint, type FakeClusterAdapter } from "@/broker/adapters/fake-cluster-adapter";
import { FIXTURE_COMMAND, RES, TERMINAL, adapterFor, byId, makeStateDir, runJson, startNode, waitForStatus } from "./harness";

const repo = path.resolve(import.meta.dirname, "../../..");

/** Start cluster-fake/index.ts as its own process and wait for its ready line. */
async function spawnEntryPoint(stateDir: string, port: number) {
  // tsx as a loader in this one process (the tsx CLI would add a parent process, and a SIGKILL
  // to that parent would leave the real server running).
  const loader = pathToFileURL(path.join(repo, "node_modules/tsx/dist/loader.mjs")).href;
  const child = spawn(process.execPath, ["--import", loader, path.join(repo, "cluster-fake/index.ts")], {
    env: {
      ...process.env, LOG_LEVEL: "warn", ERGODEX_CLUSTER_PORT: String(port), ERGODEX_CLUSTER_STATE_DIR: stateDir,
      ERGODEX_CLUSTER_SAMPLER_CMD: JSON.stringify(FIXTURE_COMMAND), ERGODEX_CLUSTER_KILL_GRACE_MS: "1000",
    },
    stdio: ["ignore", "pipe", "pipe"],
  });
  let out = "";
  const ready = await new Promise<RegExpMatchArray>((resolve, reject) => {
    const guard = setTimeout(() => reject(new Error(`no ready line; output so far: ${out}`)), 20_000);
    child.stdout!.on("data", (d: Buffer) => {
      out += d.toString();
      const m = out.match(/^cluster-fake ready 127\.0\.0\.1:(\d+) (SHA256:\S+)$/m);
      if (m) { clearTimeout(guard); resolve(m); }
    });
    child.stderr!.on("data", (d: Buffer) => { out += d.toString(); });
    child.once("exit", (code) => { clearTimeout(guard); reject(new Error(`exited ${code} before ready: ${out}`)); });
  });
  const exited = new Promise<number | null>((r) => child.once("exit", (code) => r(code)));
  return { child, port: Number(ready[1]), fingerprint: ready[2], exited };
}

const alive = (pid: number) => {
  try {
    process.kill(pid, 0);
    return true;
  } catch {
    return false;
  }
};

describe("fake cluster restarts: persisted state, lost runs, adapter reconnect", () => {
  const dir = makeStateDir();
  const children: ChildProcess[] = [];
  let node: FakeCluster | undefined;
  let adapter: FakeClusterAdapter | undefined;
  afterAll(async () => {
    await adapter?.close();
    await node?.close();
    for (const c of children) if (c.exitCode === null && c.signalCode === null) c.kill("SIGKILL");
    dir.cleanup();
  });

  it("survives a graceful stop and a crash, and the adapter reconnects each time", async () => {
    // 1. The stand-alone entry point, pinned by the fingerprint its ready line prints.
    const first = await spawnEntryPoint(dir.stateDir, 0);
    children.push(first.child);
    const pub = fs.readFileSync(path.join(dir.stateDir, "host_ed25519_key.pub"), "utf8");
    expect(first.fingerprint).toBe(sshKeyFingerprint(pub));
    const port = first.port;
    const a = adapterFor({ port, hostPublicKey: pub }, dir.clientKey);
    adapter = a;

    const long = (id: string) => ({ runId: id, runJson: runJson(id, { sweepMs: 30 }, { thermalization: 0, measurements: 500 }) });
    await a.stage([{ runId: "early", runJson: runJson("early") }, long("victim-1")]);
    await a.submit([{ runId: "early", dispatchToken: "t-early", resources: RES }]);
    await waitForStatus(a, ["early"], ([s]) => TERMINAL.has(s.state));
    await a.submit([{ runId: "victim-1", dispatchToken: "t-v1", resources: RES }]);
    const [v1] = await waitForStatus(a, ["victim-1"], ([s]) => (s.progress?.sweepsDone ?? 0) > 0);

    // 2. SIGTERM: the node terminates its sampler before it exits.
    const pid1 = (await a.connection.execJson<{ runs: { pid: number }[] }>("ergodex-node report victim-1")).runs[0].pid;
    first.child.kill("SIGTERM");
    expect(await first.exited).toBe(0);
    expect(alive(pid1)).toBe(false);
    expect(v1.state).toBe("running");

    // 3. Same state dir and port: same host key (the pin still holds), same records.
    const second = await spawnEntryPoint(dir.stateDir, port);
    children.push(second.child);
    expect(second.fingerprint).toBe(first.fingerprint);
    const st = byId(await a.status(["early", "victim-1"]));
    expect(a.connection.stats.connects).toBe(2);
    expect(st.get("early")).toMatchObject({ state: "exited", exitCode: 0, dispatchToken: "t-early" });
    expect(st.get("victim-1")).toMatchObject({ state: "lost", failure: { reason: "node_lost" } });
    expect(st.get("victim-1")!.failure!.detail).toMatch(/shut down/);

    // 4. A crash (SIGKILL): the sampler is orphaned, the node cannot record anything.
    await a.stage([long("victim-2")]);
    await a.submit([{ runId: "victim-2", dispatchToken: "t-v2", resources: RES }]);
    await waitForStatus(a, ["victim-2"], ([s]) => (s.progress?.sweepsDone ?? 0) > 0);
    const pid2 = (await a.connection.execJson<{ runs: { pid: number }[] }>("ergodex-node report victim-2")).runs[0].pid;
    second.child.kill("SIGKILL");
    await second.exited;
    expect(alive(pid2)).toBe(true);
    process.kill(-pid2, "SIGKILL"); // clean up the orphan's process group

    // 5. The adapter asks while the node is down; it backs off and gets through once the node is back.
    const pending = a.status(["early", "victim-1", "victim-2"]);
    for (let i = 0; i < 250 && a.connection.stats.failedConnects === 0; i++) await new Promise((r) => setTimeout(r, 20));
    expect(a.connection.stats.failedConnects).toBeGreaterThan(0);
    node = await startNode(dir.stateDir, { port });
    const after = byId(await pending);
    expect(a.connection.stats.connects).toBe(3);
    expect(after.get("victim-2")).toMatchObject({ state: "lost", failure: { reason: "node_lost" }, dispatchToken: "t-v2" });
    expect(after.get("victim-2")!.failure!.detail).toMatch(/restarted/);
    expect(after.get("victim-1")!.state).toBe("lost");
    expect(after.get("early")!.state).toBe("exited");

    // 6. A lost run can be resubmitted with a new token and finishes on the restarted node.
    await a.submit([{ runId: "victim-2", dispatchToken: "t-v2b", resources: RES }]);
    const [re] = await a.status(["victim-2"]);
    expect(re).toMatchObject({ attempt: 2, dispatchToken: "t-v2b" });
    await a.cancel(["victim-2"]);
  });
});
