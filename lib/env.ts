// Typed configuration, parsed once. Nothing else in the project reads process.env.
import fs from "node:fs";
import path from "node:path";
import crypto from "node:crypto";

const e = process.env;

function int(name: string, fallback: number, max = 65535): number {
  const raw = e[name];
  if (raw === undefined || raw === "") return fallback;
  const n = Number(raw);
  if (!Number.isInteger(n) || n <= 0 || n > max) throw new Error(`${name} must be a port/positive integer, got "${raw}"`);
  return n;
}

const root = e.ERGODEX_ROOT ?? process.cwd();
const dataDir = path.resolve(root, e.ERGODEX_DATA_DIR ?? ".data");

/** A secret from the environment, or generated once and kept under .data/secrets/. */
function secret(name: string, envName: string): string {
  const fromEnv = e[envName];
  if (fromEnv) return fromEnv;
  const file = path.join(dataDir, "secrets", name);
  try {
    return fs.readFileSync(file, "utf8").trim();
  } catch {
    fs.mkdirSync(dataDir, { recursive: true }); // stays traversable: PostgreSQL runs as another user below it
    fs.mkdirSync(path.dirname(file), { recursive: true, mode: 0o700 });
    const value = crypto.randomBytes(32).toString("base64url");
    try {
      fs.writeFileSync(file, value + "\n", { mode: 0o600, flag: "wx" });
    } catch {
      return fs.readFileSync(file, "utf8").trim(); // another process won the race
    }
    return value;
  }
}

export const env = {
  root,
  dataDir,
  nodeEnv: e.NODE_ENV ?? "development",
  isTest: e.ERGODEX_TEST === "1",
  logLevel: e.LOG_LEVEL ?? "info",
  pg: {
    host: e.ERGODEX_PG_HOST ?? "127.0.0.1",
    port: int("ERGODEX_PG_PORT", 54329),
    database: e.ERGODEX_PG_DB ?? "ergodex",
    user: e.ERGODEX_PG_USER ?? "ergodex",
    password: e.ERGODEX_PG_PASSWORD ?? "ergodex-local",
    dataDir: path.resolve(root, e.ERGODEX_PG_DATA ?? path.join(dataDir, "pg")),
  },
  web: {
    host: "127.0.0.1",
    port: int("ERGODEX_PORT", 3417),
    /** Largest JSON body a route handler accepts. */
    maxBodyBytes: int("ERGODEX_MAX_BODY", 1_048_576),
  },
  cluster: { port: int("ERGODEX_CLUSTER_PORT", 2222), stateDir: path.join(dataDir, "cluster-fake"), /** runs the loopback node executes at once */ slots: int("ERGODEX_CLUSTER_SLOTS", 2) },
  smtp: { port: int("ERGODEX_SMTP_PORT", 2525), mailDir: path.join(dataDir, "mail") },
  broker: {
    healthPort: int("ERGODEX_BROKER_PORT", 3418),
    /** How long failures of one ensemble are gathered into one e-mail. */
    digestSeconds: int("ERGODEX_DIGEST_SECONDS", 120),
    /** Poll interval for the loopback fake cluster (real clusters set their own, default 60 s). */
    pollSeconds: int("ERGODEX_POLL_SECONDS", 2),
    /** Grace period for jobs in hand at shutdown. */
    shutdownSeconds: int("ERGODEX_SHUTDOWN_SECONDS", 20),
  },
  /** The template database integration tests clone. */
  testTemplateDb: e.ERGODEX_PG_TEMPLATE_DB ?? "ergodex_template",
  archiveDir: path.join(dataDir, "archive"),
  /** Limits of result-bundle uploads (docs/uploads.md); the Archive page states them. */
  uploads: {
    /** Largest upload body, in bytes (default 256 MiB). */
    maxBytes: int("ERGODEX_UPLOAD_MAX_BYTES", 268_435_456, 2 ** 40),
    /** Most files one upload may hold, counted after unpacking. */
    maxFiles: int("ERGODEX_UPLOAD_MAX_FILES", 1_000),
    /** Most bytes an upload may unpack to (default 1 GiB). */
    maxUnpackedBytes: int("ERGODEX_UPLOAD_MAX_UNPACKED", 1_073_741_824, 2 ** 42),
    /** Largest uncompressed/compressed ratio of an archive (beyond 1 MiB unpacked): the zip-bomb guard. */
    maxRatio: int("ERGODEX_UPLOAD_MAX_RATIO", 200),
    /** Where uploads are received and unpacked; each upload's folder is removed when it is done. */
    dir: path.join(dataDir, "uploads"),
  },
  get appUrl(): string {
    return e.NEXTAUTH_URL ?? `http://127.0.0.1:${this.web.port}`;
  },
  get authSecret(): string {
    return secret("auth-secret", "NEXTAUTH_SECRET");
  },
  /** 32-byte key for AES-256-GCM encryption of cluster private keys. */
  get keyEncryptionKey(): Buffer {
    const raw = secret("key-encryption-key", "ERGODEX_KEY_ENCRYPTION_KEY");
    const buf = Buffer.from(raw, "base64url");
    if (buf.length !== 32) throw new Error("ERGODEX_KEY_ENCRYPTION_KEY must be 32 bytes, base64url-encoded");
    return buf;
  },
};

export function databaseUrl(database = env.pg.database): string {
  const { user, password, host, port } = env.pg;
  return `postgres://${encodeURIComponent(user)}:${encodeURIComponent(password)}@${host}:${port}/${database}`;
}
