// Integration-test databases: each test file gets a fresh clone of the migrated template database.
import crypto from "node:crypto";
import pg from "pg";
import { afterAll, beforeAll } from "vitest";
import type { Sequelize } from "sequelize";
import { databaseUrl } from "@/lib/env";
import { createSequelize, setSequelize } from "@/lib/db/sequelize";
import { recordRunsCreated } from "@/lib/runs/transition-run";
import {
  db, initModels, type Allocation, type AllocationCreationAttributes, type Cluster, type ClusterCreationAttributes, type Ensemble,
  type Group, type GroupCreationAttributes, type Models, type ParameterPoint, type Run, type Sampler, type SamplerCreationAttributes,
  type User, type UserCreationAttributes, type UserRole,
} from "@/models";

// npm test (scripts/test.sh) names the template; lib/env.ts does not carry test-only settings.
const TEMPLATE = process.env.ERGODEX_PG_TEMPLATE_DB || "ergodex_template";

/** A test file's own database. */
export type TestDatabase = { sequelize: Sequelize; models: Models; url: string; name: string };

const ident = (s: string) => '"' + s.replace(/"/g, '""') + '"';

async function admin<T>(fn: (c: pg.Client) => Promise<T>): Promise<T> {
  const c = new pg.Client({ connectionString: databaseUrl("postgres") });
  await c.connect();
  try {
    return await fn(c);
  } finally {
    await c.end();
  }
}

/** Create a database cloned from `template` (the migrated template by default); returns its name. */
export async function createDatabaseFrom(template: string | null = TEMPLATE, prefix = "ergodex_t"): Promise<string> {
  const name = `${prefix}_${crypto.randomBytes(6).toString("hex")}`;
  await admin(async (c) => {
    // CREATE DATABASE … TEMPLATE fails while anyone is connected to the template (55006);
    // another file finishing its clone releases it within moments, so a few retries suffice.
    for (let attempt = 1; ; attempt++) {
      try {
        await c.query(`CREATE DATABASE ${ident(name)}${template ? ` TEMPLATE ${ident(template)}` : ""}`);
        return;
      } catch (err) {
        const code = (err as { code?: string }).code;
        if (code === "3D000") throw new Error(`template database "${template}" does not exist: run tsx scripts/migrate.ts up --db ${template} after creating it`);
        if (code !== "55006" || attempt >= 20) throw err;
        await new Promise((r) => setTimeout(r, 250));
      }
    }
  });
  return name;
}

/** Drop a database even if connections to it linger. */
export async function dropDatabase(name: string): Promise<void> {
  await admin((c) => c.query(`DROP DATABASE IF EXISTS ${ident(name)} WITH (FORCE)`));
}

/**
 * Give the calling test file its own database, cloned from the migrated template in beforeAll
 * and dropped in afterAll. While it lives, getSequelize() and db() point at it too, so lib/
 * code under test uses it without being told. Read the handle's fields inside tests or hooks.
 */
export function useTestDatabase(): TestDatabase {
  const handle = {} as TestDatabase;
  let previous: Sequelize | undefined;
  beforeAll(async () => {
    handle.name = await createDatabaseFrom();
    handle.url = databaseUrl(handle.name);
    handle.sequelize = createSequelize(handle.url, { poolMax: 5 });
    handle.models = initModels(handle.sequelize);
    previous = setSequelize(handle.sequelize);
  });
  afterAll(async () => {
    if (!handle.sequelize) return;
    setSequelize(previous);
    try {
      await handle.sequelize.close();
    } finally {
      await dropDatabase(handle.name); // WITH (FORCE): even if a failed test left a connection open
    }
  });
  return handle;
}

// ---- Factories: minimal valid rows, through db() (the file's test database while it lives). ----

const tag = () => crypto.randomBytes(4).toString("hex");

/** A group with a unique slug. */
export async function makeGroup(overrides: Partial<GroupCreationAttributes> = {}): Promise<Group> {
  const t = tag();
  return db().Group.create({ slug: `group-${t}`, name: `Group ${t}`, institute: "Test Institute", ...overrides });
}

/** A user of `role`, a member of `group` if given (a pi leads it unless isLead says otherwise). */
export async function makeUser(
  role: UserRole = "researcher",
  group?: Group | null,
  overrides: Partial<UserCreationAttributes> & { isLead?: boolean } = {},
): Promise<User> {
  const { isLead, ...attrs } = overrides;
  const t = tag();
  const user = await db().User.create({ email: `${role}.${t}@test.example`, name: `${role} ${t}`, role, passwordHash: null, ...attrs });
  if (group) await db().Membership.create({ userId: user.id, groupId: group.id, isLead: isLead ?? role === "pi" });
  return user;
}

/** An allocation of `group` for a period around now, with one grant entry of `grantCoreHours`. */
export async function makeAllocation(group: Group, grantCoreHours: number, overrides: Partial<AllocationCreationAttributes> = {}): Promise<Allocation> {
  const day = 86_400_000;
  const allocation = await db().Allocation.create({
    groupId: group.id, name: `Allocation ${tag()}`,
    periodStart: new Date(Date.now() - 30 * day), periodEnd: new Date(Date.now() + 335 * day), ...overrides,
  });
  if (grantCoreHours > 0) await db().LedgerEntry.create({ allocationId: allocation.id, kind: "grant", coreHours: grantCoreHours, note: "test grant" });
  return allocation;
}

/** A sampler version with a unique version string. */
export async function makeSampler(overrides: Partial<SamplerCreationAttributes> = {}): Promise<Sampler> {
  return db().Sampler.create({
    name: "ising2d", version: `1.0.0-test.${tag()}`, command: "npm run sampler -- ising2d",
    paramsSchema: { type: "object", properties: { L: { type: "integer" }, T: { type: "number" } }, required: ["L", "T"] },
    observables: [{ name: "e", description: "energy per site" }, { name: "absM", description: "|m| per site" }],
    ...overrides,
  });
}

/** A fake-ssh cluster with a unique name (its key and fingerprint are placeholders). */
export async function makeCluster(overrides: Partial<ClusterCreationAttributes> = {}): Promise<Cluster> {
  return db().Cluster.create({
    name: `cluster-${tag()}`, kind: "fake-ssh", host: "127.0.0.1", port: 2222, username: "ergodex",
    hostKeyFingerprint: "SHA256:placeholder", privateKeyEncrypted: "placeholder", workDir: "/tmp/ergodex-test-runs", slotLimit: 4,
    ...overrides,
  });
}

export type EnsembleFixture = { ensemble: Ensemble; points: ParameterPoint[]; runs: Run[] };

/**
 * An ensemble with its points and queued runs (each with its creation RunEvent). Sampler and cluster
 * are made if not given; with an allocation and reserveCoreHours > 0 a reserve entry is written.
 */
export async function makeEnsemble(options: {
  owner: User; group: Group; allocation?: Allocation | null; sampler?: Sampler; cluster?: Cluster | null;
  points?: Record<string, unknown>[]; replicas?: number; reserveCoreHours?: number; tags?: string[];
}): Promise<EnsembleFixture> {
  const m = db();
  const sampler = options.sampler ?? (await makeSampler());
  const cluster = options.cluster === undefined ? await makeCluster() : options.cluster;
  const paramsList = options.points ?? [{ L: 8, T: 2.0 }, { L: 8, T: 2.5 }];
  const replicas = options.replicas ?? 2;
  const reserve = options.reserveCoreHours ?? 0;
  const spec = { sampler: { name: sampler.name, version: sampler.version }, points: paramsList, replicas };
  return m.sequelize.transaction(async (transaction) => {
    const ensemble = await m.Ensemble.create({
      name: `Ensemble ${tag()}`, ownerId: options.owner.id, groupId: options.group.id, samplerId: sampler.id,
      allocationId: options.allocation?.id ?? null, clusterId: cluster?.id ?? null, spec,
      specHash: crypto.createHash("sha256").update(JSON.stringify(spec)).digest("hex"),
      masterSeed: "20251201", tags: options.tags ?? [], reservedCoreHours: reserve,
    }, { transaction });
    const points = await m.ParameterPoint.bulkCreate(
      paramsList.map((params, pointIndex) => ({ ensembleId: ensemble.id, pointIndex, params })), { transaction, returning: true });
    const runs = await m.Run.bulkCreate(points.flatMap((p) => Array.from({ length: replicas }, (_, replica) => ({
      ensembleId: ensemble.id, pointId: p.id, replica, seed: String(1_000_003 * (p.pointIndex + 1) + replica),
      reservedCoreHours: reserve / (points.length * replicas),
    }))), { transaction, returning: true });
    await recordRunsCreated(runs, { cause: "test.create", actorId: options.owner.id, transaction });
    if (options.allocation && reserve > 0) {
      await m.LedgerEntry.create({ allocationId: options.allocation.id, kind: "reserve", coreHours: reserve, ensembleId: ensemble.id, userId: options.owner.id }, { transaction });
    }
    return { ensemble, points, runs };
  });
}
