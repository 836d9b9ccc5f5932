// What a coordinator may set on a cluster, parsed once at the edge (routes and server actions share
// these schemas) and then checked for what a schema cannot say: a real fingerprint, a readable key.
import ssh2 from "ssh2";
import { parsePinnedFingerprint } from "@/broker/adapters/host-key-fingerprint";
import { AppError } from "../errors";
import { CLUSTER_KINDS, type ClusterKind, type ClusterSettings } from "@/models/cluster";

const name = { type: "string", pattern: "^[A-Za-z0-9][A-Za-z0-9._-]{0,62}$" } as const;
const line = (max: number) => ({ type: "string", maxLength: max, pattern: "^[^\\n\\r]*$" }) as const;
const slug = { type: "string", maxLength: 64, pattern: "^[A-Za-z0-9_.-]*$" } as const;

/** Adapter settings as the form sends them; an empty string clears a field. */
export const clusterSettingsSchema = {
  type: "object", additionalProperties: false,
  properties: {
    partition: slug, account: slug,
    prelude: { type: "string", maxLength: 4000 },
    samplerCommand: line(500),
    // Sites ask for no more than one scheduler query a minute; faster only for test clusters.
    pollSeconds: { type: "integer", minimum: 1, maximum: 3600 },
    submitSeconds: { type: "integer", minimum: 1, maximum: 3600 },
    maxWallSeconds: { type: "integer", minimum: 60, maximum: 30 * 24 * 3600 },
  },
} as const;

const fields = {
  name, kind: { enum: [...CLUSTER_KINDS] },
  host: { type: "string", minLength: 1, maxLength: 253, pattern: "^[A-Za-z0-9.:-]+$" },
  port: { type: "integer", minimum: 1, maximum: 65535 },
  username: { type: "string", pattern: "^[a-z_][a-z0-9_.-]{0,31}$" },
  hostKeyFingerprint: { type: "string", maxLength: 100 },
  privateKey: { type: "string", minLength: 1, maxLength: 20_000 },
  workDir: { type: "string", minLength: 1, maxLength: 500, pattern: "^[A-Za-z0-9._/+-]+$" },
  slotLimit: { type: "integer", minimum: 1, maximum: 100_000 },
  active: { type: "boolean" },
  settings: clusterSettingsSchema,
} as const;

export const clusterCreateSchema = {
  type: "object", additionalProperties: false,
  required: ["name", "kind", "host", "username", "hostKeyFingerprint", "privateKey", "workDir", "slotLimit"],
  properties: fields,
} as const;

export const clusterUpdateSchema = { type: "object", additionalProperties: false, minProperties: 1, properties: fields } as const;

/** A new cluster as posted: the private key in plain text, sealed before it is stored. */
export type ClusterInput = {
  name: string; kind: ClusterKind; host: string; port?: number; username: string; hostKeyFingerprint: string;
  privateKey: string; workDir: string; slotLimit: number; active?: boolean; settings?: ClusterSettings;
};
export type ClusterChange = Partial<ClusterInput>;

const issue = (path: string, message: string) => new AppError("invalid", `${path.slice(1)}: ${message}`, { issues: [{ path, message }] });

/** The fingerprint normalised, or a 422 on /hostKeyFingerprint. */
export function checkFingerprint(value: string): string {
  try {
    return parsePinnedFingerprint(value);
  } catch (e) {
    throw issue("/hostKeyFingerprint", (e as Error).message);
  }
}

/** The pasted key must be an unencrypted private key ssh2 can use; its text is never echoed. */
export function checkPrivateKey(value: string): string {
  const key = value.replace(/\r\n/g, "\n").trim() + "\n";
  const parsed = ssh2.utils.parseKey(key);
  if (parsed instanceof Error) throw issue("/privateKey", `not a usable unencrypted SSH private key (${parsed.message})`);
  const k = Array.isArray(parsed) ? parsed[0] : parsed;
  if (!k.isPrivateKey()) throw issue("/privateKey", "this is a public key; paste the private half (its public half goes into authorized_keys)");
  return key;
}

/** Settings with empty strings dropped, merged over `base`. */
export function mergeSettings(base: ClusterSettings, change: ClusterSettings | undefined): ClusterSettings {
  const out: ClusterSettings = { ...base };
  for (const [k, v] of Object.entries(change ?? {})) {
    if (v === "" || v === null) delete out[k];
    else out[k] = v;
  }
  if (typeof out.pollSeconds === "number" && out.pollSeconds < 1) throw issue("/settings/pollSeconds", "must be at least 1 s");
  return out;
}
