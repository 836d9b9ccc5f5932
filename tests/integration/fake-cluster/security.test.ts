import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { execFileSync } from "node:child_process";
import ssh2 from "ssh2";
import type { SFTPWrapper } from "ssh2";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { FakeCluster } from "@/cluster-fake/server/server";
import { ClusterAuthError, HostKeyMismatchError } from "@/broker/adapters/errors";
import { sshKeyFingerprint, type FakeClusterAdapter } from "@/broker/adapters/fake-cluster-adapter";
import { adapterFor, makeStateDir, startNode } from "./harness";

const { STATUS_CODE } = ssh2.utils.sftp;

describe("fake cluster security: host-key pinning, key auth, SFTP confinement", () => {
  let dir: ReturnType<typeof makeStateDir>;
  let node: FakeCluster;
  let adapter: FakeClusterAdapter;
  let sftp: SFTPWrapper;
  const secret = "outside-the-work-root";

  beforeAll(async () => {
    dir = makeStateDir();
    node = await startNode(dir.stateDir);
    adapter = adapterFor(node, dir.clientKey);
    fs.writeFileSync(path.join(dir.stateDir, "secret.txt"), secret);
    sftp = await adapter.connection.sftp<SFTPWrapper>((s, cb) => cb(null, s));
  });
  afterAll(async () => {
    await adapter?.close();
    await node?.close();
    dir?.cleanup();
  });

  it("computes the host-key fingerprint exactly as OpenSSH's ssh-keygen prints it", () => {
    const pub = path.join(dir.stateDir, "host_ed25519_key.pub");
    const line = execFileSync("ssh-keygen", ["-l", "-E", "sha256", "-f", pub], { encoding: "utf8" });
    expect(line.split(" ")[1]).toBe(sshKeyFingerprint(node.hostPublicKey));
  });

  it("refuses a server whose host key does not match the pin, before sending anything", async () => {
    const other = ssh2.utils.generateKeyPairSync("ed25519").public;
    const wrongPin = sshKeyFingerprint(other);
    const before = { ...node.stats };
    const bad = adapterFor(node, dir.clientKey, { hostKeyFingerprint: wrongPin });
    const err = await bad.health().catch((e: unknown) => e);
    expect(err).toBeInstanceOf(HostKeyMismatchError);
    expect(err).toMatchObject({ expected: wrongPin, actual: sshKeyFingerprint(node.hostPublicKey), transient: false });
    expect(bad.connection.stats.connects).toBe(0);
    // The server saw a TCP connection but no authentication attempt and no exec.
    expect(node.stats.connections).toBe(before.connections + 1);
    expect(node.stats.authAccepted + node.stats.authRejected).toBe(before.authAccepted + before.authRejected);
    expect(node.stats.execs).toBe(before.execs);
    await bad.close();
  });

  it("rejects a client key that is not in authorized_keys", async () => {
    const stranger = ssh2.utils.generateKeyPairSync("ed25519").private;
    const before = { ...node.stats };
    const bad = adapterFor(node, stranger);
    const err = await bad.health().catch((e: unknown) => e);
    expect(err).toBeInstanceOf(ClusterAuthError);
    expect(node.stats.authRejected).toBeGreaterThan(before.authRejected);
    expect(node.stats.authAccepted).toBe(before.authAccepted);
    expect(node.stats.execs).toBe(before.execs);
    await bad.close();
  });

  it("answers a command outside the protocol with exit 127 and runs nothing", async () => {
    const r = await adapter.connection.exec("cat /etc/passwd");
    expect(r.code).toBe(127);
    expect(JSON.parse(r.stdout)).toMatchObject({ error: { code: "unknown_command" } });
    expect(r.stdout).not.toContain("root:");
  });

  const call = <T>(fn: (cb: (err: Error | null | undefined, v?: T) => void) => void) =>
    new Promise<{ err: (Error & { code?: number }) | null; value?: T }>((resolve) => fn((err, value) => resolve({ err: err ?? null, value })));

  it("maps / to the work root and refuses '..' that climbs above it", async () => {
    const real = await call<string>((cb) => sftp.realpath(".", cb));
    expect(real.value).toBe("/");
    for (const p of ["../secret.txt", "/../secret.txt", "a/../../secret.txt", "/x/../../state.json"]) {
      const r = await call<Buffer>((cb) => sftp.readFile(p, cb));
      expect(r.err?.code, p).toBe(STATUS_CODE.PERMISSION_DENIED);
    }
    const w = await call<void>((cb) => sftp.writeFile("../planted.txt", "x", cb));
    expect(w.err?.code).toBe(STATUS_CODE.PERMISSION_DENIED);
    expect(fs.existsSync(path.join(dir.stateDir, "planted.txt"))).toBe(false);
  });

  it("reads an absolute host path inside the jail, never the real file", async () => {
    const hostPath = path.join(dir.stateDir, "secret.txt");
    const r = await call<Buffer>((cb) => sftp.readFile(hostPath, cb));
    expect(r.err?.code).toBe(STATUS_CODE.NO_SUCH_FILE);
    const w = await call<void>((cb) => sftp.writeFile("/etc-copy.txt", "inside", cb));
    expect(w.err).toBeNull();
    expect(fs.readFileSync(path.join(dir.stateDir, "work", "etc-copy.txt"), "utf8")).toBe("inside");
  });

  it("refuses paths through a planted symlink, and symlink creation", async () => {
    fs.symlinkSync(dir.stateDir, path.join(dir.stateDir, "work", "escape"));
    fs.symlinkSync(path.join(dir.stateDir, "secret.txt"), path.join(dir.stateDir, "work", "secret-link"));
    for (const p of ["escape/secret.txt", "secret-link"]) {
      const r = await call<Buffer>((cb) => sftp.readFile(p, cb));
      expect(r.err?.code, p).toBe(STATUS_CODE.PERMISSION_DENIED);
    }
    const w = await call<void>((cb) => sftp.writeFile("escape/planted.txt", "x", cb));
    expect(w.err?.code).toBe(STATUS_CODE.PERMISSION_DENIED);
    expect(fs.existsSync(path.join(dir.stateDir, "planted.txt"))).toBe(false);
    const l = await call<void>((cb) => sftp.symlink("/", "/loop", cb));
    expect(l.err?.code).toBe(STATUS_CODE.OP_UNSUPPORTED);
    const ls = await call<ssh2.FileEntry[]>((cb) => sftp.readdir("escape", cb));
    expect(ls.err?.code).toBe(STATUS_CODE.PERMISSION_DENIED);
  });

  it("refuses to fetch a bundle containing a symlink", async () => {
    fs.mkdirSync(path.join(dir.stateDir, "work", "sneaky", "out"), { recursive: true });
    fs.writeFileSync(path.join(dir.stateDir, "work", "sneaky", "out", "manifest.json"), "{}");
    fs.symlinkSync(path.join(dir.stateDir, "secret.txt"), path.join(dir.stateDir, "work", "sneaky", "out", "leak"));
    const local = fs.mkdtempSync(path.join(os.tmpdir(), "ergodex-fetch-"));
    await expect(adapter.fetch("sneaky", local)).rejects.toThrow(/neither a file nor a directory/);
    expect(fs.existsSync(path.join(local, "leak"))).toBe(false);
    fs.rmSync(local, { recursive: true, force: true });
  });
});
