// Where and what runs: clusters (reached over SSH) and sampler versions.
import { runSql, type Migration } from "../lib/db/migration";

export const up: Migration = async ({ context: qi }) => {
  await runSql(qi, `
    CREATE TABLE clusters (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      name text NOT NULL UNIQUE CHECK (length(trim(name)) > 0),
      kind text NOT NULL CHECK (kind IN ('fake-ssh', 'batch-ssh')),
      host text NOT NULL,
      port integer NOT NULL DEFAULT 22 CHECK (port BETWEEN 1 AND 65535),
      username text NOT NULL,
      host_key_fingerprint text NOT NULL,
      private_key_encrypted text NOT NULL,
      work_dir text NOT NULL,
      slot_limit integer NOT NULL CHECK (slot_limit > 0),
      active boolean NOT NULL DEFAULT true,
      healthy boolean NOT NULL DEFAULT true,
      health_note text,
      last_contact_at timestamptz,
      settings jsonb NOT NULL DEFAULT '{}'::jsonb CHECK (jsonb_typeof(settings) = 'object'),
      created_at timestamptz NOT NULL DEFAULT now(),
      updated_at timestamptz NOT NULL DEFAULT now()
    );

    CREATE TABLE samplers (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      name text NOT NULL CHECK (name ~ '^[A-Za-z0-9][A-Za-z0-9._-]*$'),
      version text NOT NULL CHECK (length(version) > 0),
      command text NOT NULL,
      params_schema jsonb NOT NULL CHECK (jsonb_typeof(params_schema) = 'object'),
      observables jsonb NOT NULL DEFAULT '[]'::jsonb CHECK (jsonb_typeof(observables) = 'array'),
      code_hash text,
      description text,
      created_at timestamptz NOT NULL DEFAULT now(),
      updated_at timestamptz NOT NULL DEFAULT now(),
      UNIQUE (name, version)
    );
  `);
};

export const down: Migration = async ({ context: qi }) => {
  await runSql(qi, `
    DROP TABLE samplers;
    DROP TABLE clusters;
  `);
};
