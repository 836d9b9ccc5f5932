import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { createHash, randomBytes } from "node:crypto";
import ssh2 from "ssh2";
import type { FileEntry, SFTPWrapper, Stats } from "ssh2";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { FakeCluster } from "@/cluster-fake/server/server";
import type { FakeClusterAdapter } from "@/broker/adapters/fake-cluster-adapter";
import { adapterFor, makeStateDir, startNode } from "./harness";

const { STATUS_CODE } = ssh2.utils.sftp;
const sha = (b: Buffer) => createHash("sha256").update(b).digest("hex");

describe("fake cluster SFTP: the operations ssh2's client uses for staging and fetching", () => {
  let dir: ReturnType<typeof makeStateDir>;
  let node: FakeCluster;
  let adapter: FakeClusterAdapter;
  let sftp: SFTPWrapper;
  const tmp = fs.mkdtempSync(path.join(os.tmpdir(), "ergodex-sftp-"));
  const p = <T>(fn: (cb: (err: Error | null | undefined, v?: T) => void) => void) =>
    new Promise<T>((resolve, reject) => fn((err, v) => (err ? reject(err) : resolve(v as T))));

  beforeAll(async () => {
    dir = makeStateDir();
    node = await startNode(dir.stateDir);
    adapter = adapterFor(node, dir.clientKey);
    sftp = await adapter.connection.sftp<SFTPWrapper>((s, cb) => cb(null, s));
  });
  afterAll(async () => {
    await adapter?.close();
    await node?.close();
    dir?.cleanup();
    fs.rmSync(tmp, { recursive: true, force: true });
  });

  it("round-trips a multi-chunk file with fastPut and fastGet", async () => {
    // 300 kB: several 32 kB requests in flight at once, and a short last chunk.
    const data = randomBytes(300_000 + 123);
    fs.writeFileSync(path.join(tmp, "up.bin"), data);
    await p<void>((cb) => sftp.mkdir("/stage", cb));
    await p<void>((cb) => sftp.fastPut(path.join(tmp, "up.bin"), "/stage/up.bin", cb));
    expect(sha(fs.readFileSync(path.join(dir.stateDir, "work", "stage", "up.bin")))).toBe(sha(data));
    await p<void>((cb) => sftp.fastGet("/stage/up.bin", path.join(tmp, "down.bin"), cb));
    expect(sha(fs.readFileSync(path.join(tmp, "down.bin")))).toBe(sha(data));
    const st = await p<Stats>((cb) => sftp.stat("/stage/up.bin", cb));
    expect(st.size).toBe(data.length);
    expect(st.isFile()).toBe(true);
  });

  it("lists, renames, removes and reports missing files with the right status codes", async () => {
    await p<void>((cb) => sftp.writeFile("/stage/a.txt", "alpha", cb));
    await p<void>((cb) => sftp.rename("/stage/a.txt", "/stage/b.txt", cb));
    expect((await p<Buffer>((cb) => sftp.readFile("/stage/b.txt", cb))).toString()).toBe("alpha");
    const names = (await p<FileEntry[]>((cb) => sftp.readdir("/stage", cb))).map((e) => e.filename).sort();
    expect(names).toEqual(["b.txt", "up.bin"]);
    await p<void>((cb) => sftp.unlink("/stage/b.txt", cb));
    await p<void>((cb) => sftp.unlink("/stage/up.bin", cb));
    await p<void>((cb) => sftp.rmdir("/stage", cb));
    expect(fs.existsSync(path.join(dir.stateDir, "work", "stage"))).toBe(false);
    const err = await p<Buffer>((cb) => sftp.readFile("/stage/b.txt", cb)).catch((e: { code?: number }) => e);
    expect((err as { code?: number }).code).toBe(STATUS_CODE.NO_SUCH_FILE);
    const rootGone = await p<void>((cb) => sftp.rmdir("/", cb)).catch((e: { code?: number }) => e);
    expect((rootGone as { code?: number }).code).toBe(STATUS_CODE.PERMISSION_DENIED);
  });

  it("stages run.json idempotently through the adapter", async () => {
    const runJson = { format: "ergodex.run/1", runId: "stage-me", sampler: { name: "fixture", version: "0" } };
    await adapter.stage([{ runId: "stage-me", runJson }]);
    await adapter.stage([{ runId: "stage-me", runJson }]); // existing folder is fine
    const onNode = JSON.parse(fs.readFileSync(path.join(dir.stateDir, "work", "stage-me", "run.json"), "utf8"));
    expect(onNode).toEqual(runJson);
    await expect(adapter.stage([{ runId: "other", runJson }])).rejects.toThrow(/carries runId stage-me/);
    await expect(adapter.stage([{ runId: "../up", runJson: { ...runJson, runId: "../up" } }])).rejects.toThrow(/invalid run id/);
  });
});
