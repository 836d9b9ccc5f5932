// Frozen manuscripts: what each one froze, who may edit it, verification and replay records, and
// triggers that make the database itself refuse changes beneath a frozen manuscript.
//
// These tables live in their own schema "provenance": they are reached by raw SQL from
// lib/manuscripts and lib/provenance only and have no Sequelize model (models/ maps public.*).
import { runSql, type Migration } from "../lib/db/migration";

export const up: Migration = async ({ context: qi }) => {
  await runSql(qi, `
    CREATE SCHEMA provenance;

    -- One row per estimate, run and archived file a frozen manuscript rests on, written at freeze time.
    CREATE TABLE provenance.frozen_items (
      manuscript_id uuid NOT NULL REFERENCES manuscripts (id) ON DELETE CASCADE,
      item_kind text NOT NULL CHECK (item_kind IN ('estimate', 'run', 'artifact')),
      item_key text NOT NULL CHECK (length(item_key) > 0),
      PRIMARY KEY (manuscript_id, item_kind, item_key)
    );
    CREATE INDEX frozen_items_item ON provenance.frozen_items (item_kind, item_key);

    CREATE TABLE provenance.manuscript_collaborators (
      manuscript_id uuid NOT NULL REFERENCES manuscripts (id) ON DELETE CASCADE,
      user_id uuid NOT NULL REFERENCES users (id) ON DELETE CASCADE,
      added_by_id uuid NOT NULL REFERENCES users (id) ON DELETE RESTRICT,
      created_at timestamptz NOT NULL DEFAULT now(),
      PRIMARY KEY (manuscript_id, user_id)
    );

    CREATE TABLE provenance.verifications (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      manuscript_id uuid NOT NULL REFERENCES manuscripts (id) ON DELETE CASCADE,
      state text NOT NULL DEFAULT 'queued' CHECK (state IN ('queued', 'running', 'verified', 'differs', 'failed')),
      items_done integer NOT NULL DEFAULT 0 CHECK (items_done >= 0),
      items_total integer NOT NULL DEFAULT 0 CHECK (items_total >= 0),
      report jsonb,
      requested_by_id uuid REFERENCES users (id) ON DELETE SET NULL,
      created_at timestamptz NOT NULL DEFAULT now(),
      finished_at timestamptz
    );
    CREATE INDEX verifications_manuscript ON provenance.verifications (manuscript_id, created_at);

    CREATE TABLE provenance.replays (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      run_id uuid NOT NULL REFERENCES runs (id) ON DELETE CASCADE,
      state text NOT NULL DEFAULT 'queued' CHECK (state IN ('queued', 'running', 'identical', 'differs', 'failed')),
      sampler_version text,
      report jsonb,
      requested_by_id uuid REFERENCES users (id) ON DELETE SET NULL,
      created_at timestamptz NOT NULL DEFAULT now(),
      finished_at timestamptz
    );
    CREATE INDEX replays_run ON provenance.replays (run_id, created_at);

    CREATE FUNCTION provenance.is_frozen(kind text, key text) RETURNS boolean LANGUAGE sql STABLE AS $$
      SELECT EXISTS (SELECT 1 FROM provenance.frozen_items WHERE item_kind = kind AND item_key = key)
    $$;

    CREATE FUNCTION provenance.refuse_frozen(what text, op text) RETURNS void LANGUAGE plpgsql AS $$
    BEGIN
      RAISE EXCEPTION '% is frozen by a manuscript: % refused', what, op USING ERRCODE = 'insufficient_privilege';
    END $$;

    -- A frozen estimate may only lose or regain isCurrent: re-analysis stores a new version beside it.
    CREATE FUNCTION provenance.guard_estimate() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      IF provenance.is_frozen('estimate', OLD.id::text) THEN
        IF TG_OP = 'UPDATE' AND (to_jsonb(NEW) - 'is_current') = (to_jsonb(OLD) - 'is_current') THEN RETURN NEW; END IF;
        PERFORM provenance.refuse_frozen('estimate ' || OLD.id, TG_OP);
      END IF;
      IF TG_OP = 'DELETE' THEN RETURN OLD; END IF;
      RETURN NEW;
    END $$;
    CREATE TRIGGER estimates_frozen BEFORE UPDATE OR DELETE ON estimates FOR EACH ROW EXECUTE FUNCTION provenance.guard_estimate();

    CREATE FUNCTION provenance.guard_run() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      IF provenance.is_frozen('run', OLD.id::text) THEN PERFORM provenance.refuse_frozen('run ' || OLD.id, TG_OP); END IF;
      IF TG_OP = 'DELETE' THEN RETURN OLD; END IF;
      RETURN NEW;
    END $$;
    CREATE TRIGGER runs_frozen BEFORE UPDATE OR DELETE ON runs FOR EACH ROW EXECUTE FUNCTION provenance.guard_run();

    -- Series and run files of a frozen run: no change at all, not even an added chunk or file.
    CREATE FUNCTION provenance.guard_run_child() RETURNS trigger LANGUAGE plpgsql AS $$
    DECLARE rid uuid := CASE WHEN TG_OP = 'INSERT' THEN NEW.run_id ELSE OLD.run_id END;
    BEGIN
      IF provenance.is_frozen('run', rid::text) THEN PERFORM provenance.refuse_frozen(TG_TABLE_NAME || ' of run ' || rid, TG_OP); END IF;
      IF TG_OP = 'DELETE' THEN RETURN OLD; END IF;
      RETURN NEW;
    END $$;
    CREATE TRIGGER series_frozen BEFORE INSERT OR UPDATE OR DELETE ON series FOR EACH ROW EXECUTE FUNCTION provenance.guard_run_child();
    CREATE TRIGGER run_artifacts_frozen BEFORE INSERT OR UPDATE OR DELETE ON run_artifacts FOR EACH ROW EXECUTE FUNCTION provenance.guard_run_child();

    -- Purging an archived file a frozen manuscript needs starts by deleting its row: refused here.
    CREATE FUNCTION provenance.guard_artifact() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      IF provenance.is_frozen('artifact', OLD.sha256) THEN PERFORM provenance.refuse_frozen('archived file ' || OLD.sha256, TG_OP); END IF;
      IF TG_OP = 'DELETE' THEN RETURN OLD; END IF;
      RETURN NEW;
    END $$;
    CREATE TRIGGER artifacts_frozen BEFORE UPDATE OR DELETE ON artifacts FOR EACH ROW EXECUTE FUNCTION provenance.guard_artifact();

    -- TRUNCATE skips row triggers: refuse it on every protected table while anything is frozen.
    CREATE FUNCTION provenance.guard_truncate() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      IF EXISTS (SELECT 1 FROM provenance.frozen_items) THEN PERFORM provenance.refuse_frozen(TG_TABLE_NAME, TG_OP); END IF;
      RETURN NULL;
    END $$;
    CREATE TRIGGER estimates_frozen_truncate BEFORE TRUNCATE ON estimates FOR EACH STATEMENT EXECUTE FUNCTION provenance.guard_truncate();
    CREATE TRIGGER runs_frozen_truncate BEFORE TRUNCATE ON runs FOR EACH STATEMENT EXECUTE FUNCTION provenance.guard_truncate();
    CREATE TRIGGER series_frozen_truncate BEFORE TRUNCATE ON series FOR EACH STATEMENT EXECUTE FUNCTION provenance.guard_truncate();
    CREATE TRIGGER run_artifacts_frozen_truncate BEFORE TRUNCATE ON run_artifacts FOR EACH STATEMENT EXECUTE FUNCTION provenance.guard_truncate();
    CREATE TRIGGER artifacts_frozen_truncate BEFORE TRUNCATE ON artifacts FOR EACH STATEMENT EXECUTE FUNCTION provenance.guard_truncate();

    -- A frozen manuscript: no edits and no deletion; the one change allowed is unfreezing (state → draft).
    CREATE FUNCTION provenance.guard_manuscript() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      IF OLD.state = 'frozen' AND (TG_OP = 'DELETE' OR NEW.state = 'frozen') THEN
        PERFORM provenance.refuse_frozen('manuscript ' || OLD.id, TG_OP);
      END IF;
      IF TG_OP = 'DELETE' THEN RETURN OLD; END IF;
      RETURN NEW;
    END $$;
    CREATE TRIGGER manuscripts_frozen BEFORE UPDATE OR DELETE ON manuscripts FOR EACH ROW EXECUTE FUNCTION provenance.guard_manuscript();

    CREATE FUNCTION provenance.guard_exhibit() RETURNS trigger LANGUAGE plpgsql AS $$
    DECLARE mid uuid := CASE WHEN TG_OP = 'INSERT' THEN NEW.manuscript_id ELSE OLD.manuscript_id END;
    BEGIN
      IF EXISTS (SELECT 1 FROM manuscripts WHERE id = mid AND state = 'frozen') THEN
        PERFORM provenance.refuse_frozen('exhibit of manuscript ' || mid, TG_OP);
      END IF;
      IF TG_OP = 'DELETE' THEN RETURN OLD; END IF;
      RETURN NEW;
    END $$;
    CREATE TRIGGER exhibits_frozen BEFORE INSERT OR UPDATE OR DELETE ON exhibits FOR EACH ROW EXECUTE FUNCTION provenance.guard_exhibit();

    -- Membership rows go only once their manuscript is no longer frozen (unfreeze first, then release).
    CREATE FUNCTION provenance.guard_frozen_items() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      IF TG_OP = 'UPDATE' OR EXISTS (SELECT 1 FROM manuscripts WHERE id = OLD.manuscript_id AND state = 'frozen') THEN
        PERFORM provenance.refuse_frozen('the frozen items of manuscript ' || OLD.manuscript_id, TG_OP);
      END IF;
      RETURN OLD;
    END $$;
    CREATE TRIGGER frozen_items_guard BEFORE UPDATE OR DELETE ON provenance.frozen_items FOR EACH ROW EXECUTE FUNCTION provenance.guard_frozen_items();
  `);
};

export const down: Migration = async ({ context: qi }) => {
  await runSql(qi, `
    DROP TRIGGER exhibits_frozen ON exhibits;
    DROP TRIGGER manuscripts_frozen ON manuscripts;
    DROP TRIGGER artifacts_frozen_truncate ON artifacts;
    DROP TRIGGER run_artifacts_frozen_truncate ON run_artifacts;
    DROP TRIGGER series_frozen_truncate ON series;
    DROP TRIGGER runs_frozen_truncate ON runs;
    DROP TRIGGER estimates_frozen_truncate ON estimates;
    DROP TRIGGER artifacts_frozen ON artifacts;
    DROP TRIGGER run_artifacts_frozen ON run_artifacts;
    DROP TRIGGER series_frozen ON series;
    DROP TRIGGER runs_frozen ON runs;
    DROP TRIGGER estimates_frozen ON estimates;
    DROP SCHEMA provenance CASCADE;
  `);
};
