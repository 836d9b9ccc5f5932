// Allocations of core-hours to groups for a period. Their balance lives in ledger_entries.
import { runSql, type Migration } from "../lib/db/migration";

export const up: Migration = async ({ context: qi }) => {
  await runSql(qi, `
    CREATE TABLE allocations (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      group_id uuid NOT NULL REFERENCES groups (id) ON DELETE RESTRICT,
      name text NOT NULL CHECK (length(trim(name)) > 0),
      period_start timestamptz NOT NULL,
      period_end timestamptz NOT NULL,
      per_person_cap_core_hours numeric(16, 4) CHECK (per_person_cap_core_hours > 0),
      alerted_at_80 timestamptz,
      alerted_at_100 timestamptz,
      created_at timestamptz NOT NULL DEFAULT now(),
      updated_at timestamptz NOT NULL DEFAULT now(),
      CONSTRAINT allocations_period CHECK (period_end > period_start),
      UNIQUE (group_id, name)
    );
  `);
};

export const down: Migration = async ({ context: qi }) => {
  await runSql(qi, `DROP TABLE allocations;`);
};
