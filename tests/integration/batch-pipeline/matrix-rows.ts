// Authorization-matrix rows for the cluster admin routes and actions (spread into
// tests/integration/auth/matrix.test.ts): coordinators and admins only. The check and the host-key
// probe really connect: the probe to the test stack's fake node, the check to a throwaway cluster
// on a closed port (a failed check is still a 200 with ok: false).
import crypto from "node:crypto";
import ssh2 from "ssh2";
import type { ActionDef } from "@/lib/auth/action";
import type { Role } from "@/lib/auth/roles";
import * as clusterActions from "@/lib/actions/clusters";
import { sealSecret } from "@/lib/crypto/secret-box";
import { env } from "@/lib/env";
import { db } from "@/models";
import type { makeMatrixPeople, Person } from "@/tests/integration/auth/people-fixture";

type Fx = Awaited<ReturnType<typeof makeMatrixPeople>>;
type Expect = Partial<Record<Role | "anonymous", number | { member: number; outsider: number }>>;
const STAFF = (ok: number): Expect => ({ anonymous: 401, viewer: 403, researcher: 403, pi: 403, coordinator: ok, admin: ok });
const uniq = () => crypto.randomBytes(5).toString("hex");
const FINGERPRINT = `SHA256:${crypto.createHash("sha256").update("matrix").digest("base64").replace(/=+$/, "")}`;

/** A usable private key (ssh2 can parse what it generates, almost always: retried). */
function privateKey(): string {
  for (;;) {
    const pair = ssh2.utils.generateKeyPairSync("ed25519");
    if (!(ssh2.utils.parseKey(pair.private) instanceof Error)) return pair.private;
  }
}
const newCluster = () => ({ name: `matrix-${uniq()}`, kind: "batch-ssh", host: "127.0.0.1", port: 1, username: "ergodex", hostKeyFingerprint: FINGERPRINT,
  privateKey: privateKey(), workDir: "ergodex/runs", slotLimit: 2, settings: { partition: "batch", pollSeconds: 60 } });
/** A throwaway inactive cluster on a closed port. */
const throwawayCluster = async () => (await db().Cluster.create({
  name: `matrix-${uniq()}`, kind: "batch-ssh", host: "127.0.0.1", port: 1, username: "ergodex", hostKeyFingerprint: FINGERPRINT,
  privateKeyEncrypted: sealSecret(privateKey()), workDir: "ergodex/runs", slotLimit: 1, active: false,
})).id;

type RouteRow = { file: string; method: string; path: (fx: Fx, p: Person | null) => string | Promise<string>; body?: (fx: Fx, p: Person | null) => unknown; expect: Expect };
type ActionRow = { file: string; def: ActionDef<any, any>; input: (fx: Fx, p: Person) => unknown | Promise<unknown>; expect: Expect };

export const CLUSTER_ROUTES: RouteRow[] = [
  { file: "app/api/v1/clusters/route.ts", method: "GET", path: () => "/api/v1/clusters", expect: STAFF(200) },
  { file: "app/api/v1/clusters/route.ts", method: "POST", path: () => "/api/v1/clusters", body: newCluster, expect: STAFF(201) },
  { file: "app/api/v1/clusters/[id]/route.ts", method: "PATCH", path: async () => `/api/v1/clusters/${await throwawayCluster()}`, body: () => ({ slotLimit: 3 }), expect: STAFF(200) },
  { file: "app/api/v1/clusters/[id]/check/route.ts", method: "POST", path: async () => `/api/v1/clusters/${await throwawayCluster()}/check`, expect: STAFF(200) },
];

export const CLUSTER_ACTIONS: ActionRow[] = [
  { file: "app/(app)/clusters/actions/create-cluster.ts", def: clusterActions.createClusterAction, input: newCluster, expect: STAFF(200) },
  { file: "app/(app)/clusters/actions/update-cluster.ts", def: clusterActions.updateClusterAction, input: async () => ({ id: await throwawayCluster(), change: { slotLimit: 4 } }), expect: STAFF(200) },
  { file: "app/(app)/clusters/actions/check-cluster.ts", def: clusterActions.checkClusterAction, input: async () => ({ id: await throwawayCluster() }), expect: STAFF(200) },
  { file: "app/(app)/clusters/actions/fetch-host-key.ts", def: clusterActions.fetchHostKeyAction, input: () => ({ host: "127.0.0.1", port: env.cluster.port }), expect: STAFF(200) },
];
