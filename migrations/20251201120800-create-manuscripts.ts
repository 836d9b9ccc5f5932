// Manuscripts and their exhibits (figures and tables), snapshotted with hashes when frozen.
import { runSql, type Migration } from "../lib/db/migration";

export const up: Migration = async ({ context: qi }) => {
  await runSql(qi, `
    CREATE TABLE manuscripts (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      group_id uuid NOT NULL REFERENCES groups (id) ON DELETE RESTRICT,
      title text NOT NULL CHECK (length(trim(title)) > 0),
      journal text,
      state text NOT NULL DEFAULT 'draft' CHECK (state IN ('draft', 'frozen')),
      frozen_at timestamptz,
      frozen_by_id uuid REFERENCES users (id) ON DELETE RESTRICT,
      created_by_id uuid NOT NULL REFERENCES users (id) ON DELETE RESTRICT,
      created_at timestamptz NOT NULL DEFAULT now(),
      updated_at timestamptz NOT NULL DEFAULT now(),
      CONSTRAINT manuscripts_frozen CHECK ((state = 'frozen') = (frozen_at IS NOT NULL AND frozen_by_id IS NOT NULL))
    );
    CREATE INDEX manuscripts_group_id ON manuscripts (group_id);

    CREATE TABLE exhibits (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      manuscript_id uuid NOT NULL REFERENCES manuscripts (id) ON DELETE CASCADE,
      label text NOT NULL CHECK (length(trim(label)) > 0),
      caption text,
      kind text NOT NULL CHECK (kind IN ('figure', 'table')),
      query jsonb NOT NULL CHECK (jsonb_typeof(query) = 'object'),
      snapshot jsonb,
      snapshot_hash char(64) CHECK (snapshot_hash ~ '^[0-9a-f]{64}$'),
      position integer NOT NULL DEFAULT 0 CHECK (position >= 0),
      created_at timestamptz NOT NULL DEFAULT now(),
      updated_at timestamptz NOT NULL DEFAULT now(),
      UNIQUE (manuscript_id, label),
      CONSTRAINT exhibits_snapshot_hash CHECK ((snapshot IS NULL) = (snapshot_hash IS NULL))
    );
  `);
};

export const down: Migration = async ({ context: qi }) => {
  await runSql(qi, `
    DROP TABLE exhibits;
    DROP TABLE manuscripts;
  `);
};
