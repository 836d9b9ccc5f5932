// Cluster administration (lib/clusters): create and edit with the key sealed and never shown,
// field-located refusals, audit entries for every change, the host-key probe (shown, never
// trusted) and the connection test, against a real fake node over SSH.
import crypto from "node:crypto";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { sshKeyFingerprint } from "@/broker/adapters/host-key-fingerprint";
import { openSecret } from "@/lib/crypto/secret-box";
import { createCluster, updateCluster } from "@/lib/clusters/manage-clusters";
import { checkCluster, fetchHostKey } from "@/lib/clusters/check-cluster";
import { closeAdapters } from "@/lib/clusters/adapter-for";
import { stopBoss } from "@/lib/queue/boss";
import { AppError } from "@/lib/errors";
import { useTestDatabase } from "@/tests/support/db";
import { makeUser } from "@/tests/support/db";
import { db } from "@/models";
import { clientKeyPair, removeTempDirs, startNode } from "@/tests/integration/broker/support";

useTestDatabase();
let node: Awaited<ReturnType<typeof startNode>>;
let audit: { actorId: string; ip: null; requestId: string };
const other = `SHA256:${crypto.createHash("sha256").update("someone else's key").digest("base64").replace(/=+$/, "")}`;

beforeAll(async () => {
  node = await startNode({ slots: 2 });
  const coordinator = await makeUser("coordinator");
  await makeUser("admin"); // someone to alert on a mismatch
  audit = { actorId: coordinator.id, ip: null, requestId: "cluster-admin-test" };
});
afterAll(async () => {
  await closeAdapters();
  await stopBoss({ graceful: false }); // the mismatch alert started pg-boss to queue its e-mail
  await node?.node.close();
  removeTempDirs();
});

const input = (o: Record<string, unknown> = {}) => ({
  name: `c-${crypto.randomBytes(3).toString("hex")}`, kind: "fake-ssh" as const, host: "127.0.0.1", port: node.node.port, username: "ergodex",
  hostKeyFingerprint: sshKeyFingerprint(node.node.hostPublicKey), privateKey: node.clientKey, workDir: "runs", slotLimit: 2, ...o,
});
const refusal = async (p: Promise<unknown>) => {
  const err = await p.then(() => null, (e: unknown) => e);
  expect(err).toBeInstanceOf(AppError);
  return { code: (err as AppError).code, paths: ((err as AppError).details?.issues ?? []).map((i) => i.path) };
};

describe("cluster administration", () => {
  it("creates a cluster with the key sealed, never returned and never audited in clear", async () => {
    const view = await createCluster(audit, input({ kind: "batch-ssh", settings: { partition: "batch", prelude: "module load nodejs/20", pollSeconds: 60, submitSeconds: 5, account: "" } }));
    expect(JSON.stringify(view)).not.toContain("PRIVATE KEY");
    expect(view).toMatchObject({ kind: "batch-ssh", hasPrivateKey: true, settings: { partition: "batch", pollSeconds: 60, submitSeconds: 5 } });
    expect(view.settings).not.toHaveProperty("account"); // an empty field is not stored
    const row = (await db().Cluster.findByPk(view.id))!;
    expect(row.privateKeyEncrypted).not.toContain("PRIVATE KEY");
    expect(openSecret(row.privateKeyEncrypted).trim()).toBe(node.clientKey.trim());
    const entries = await db().AuditEntry.findAll({ where: { targetId: view.id } });
    expect(entries.map((e) => e.action)).toEqual(["cluster.create"]);
    expect(entries[0].actorId).toBe(audit.actorId);
    expect(JSON.stringify(entries[0].detail)).not.toContain("PRIVATE KEY");
    expect(entries[0].detail).toMatchObject({ privateKey: "set", host: "127.0.0.1" });
  });

  it("refuses a malformed fingerprint, a public key in the key field and a taken name, pointing at the field", async () => {
    expect(await refusal(createCluster(audit, input({ hostKeyFingerprint: "ab:cd:ef" })))).toEqual({ code: "invalid", paths: ["/hostKeyFingerprint"] });
    expect(await refusal(createCluster(audit, input({ privateKey: clientKeyPair().public })))).toEqual({ code: "invalid", paths: ["/privateKey"] });
    const first = input();
    await createCluster(audit, first);
    expect(await refusal(createCluster(audit, { ...first }))).toEqual({ code: "conflict", paths: ["/name"] });
  });

  it("shows the host key a login node presents without authenticating, and the connection test uses the pinned one", async () => {
    const shown = await fetchHostKey("127.0.0.1", node.node.port);
    expect(shown).toMatchObject({ fingerprint: sshKeyFingerprint(node.node.hostPublicKey), keyType: "ssh-ed25519" });
    expect(node.node.stats.authRejected).toBe(0); // the probe hung up before offering anything

    const good = await createCluster(audit, input());
    expect(await checkCluster(audit, good.id)).toMatchObject({ ok: true, slots: 2 });
    expect((await db().Cluster.findByPk(good.id))!.lastContactAt).not.toBeNull();

    const spoofed = await createCluster(audit, input({ hostKeyFingerprint: other }));
    const bad = await checkCluster(audit, spoofed.id);
    expect(bad.ok).toBe(false);
    expect(bad.detail).toMatch(/host key/i);
    const row = (await db().Cluster.findByPk(spoofed.id))!;
    expect(row.healthy).toBe(false);
    expect(row.healthNote).toContain(sshKeyFingerprint(node.node.hostPublicKey));
    expect((await db().AuditEntry.findAll({ where: { targetId: spoofed.id, action: "cluster.check" } })).map((e) => e.detail)).toEqual([{ ok: false, detail: bad.detail }]);

    // Pinning the right key (a person's decision) clears the mark; deactivating is audited as such.
    const fixed = await updateCluster(audit, spoofed.id, { hostKeyFingerprint: sshKeyFingerprint(node.node.hostPublicKey) });
    expect(fixed).toMatchObject({ healthy: true, healthNote: null });
    expect(await checkCluster(audit, spoofed.id)).toMatchObject({ ok: true });
    const off = await updateCluster(audit, spoofed.id, { active: false, settings: { pollSeconds: 120 } });
    expect(off).toMatchObject({ active: false, settings: { pollSeconds: 120 } });
    const actions = (await db().AuditEntry.findAll({ where: { targetId: spoofed.id }, order: [["createdAt", "ASC"], ["id", "ASC"]] })).map((e) => e.action);
    expect(actions).toEqual(["cluster.create", "cluster.check", "cluster.update", "cluster.check", "cluster.deactivate"]);
    const deact = await db().AuditEntry.findOne({ where: { targetId: spoofed.id, action: "cluster.deactivate" } });
    expect(deact!.detail).toMatchObject({ changed: { active: { from: true, to: false } } });
  });

  it("a probe of a closed port says so", async () => {
    expect((await refusal(fetchHostKey("127.0.0.1", 1))).code).toBe("bad_request");
  });
});
