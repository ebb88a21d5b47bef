import type { QueryInterface } from 'sequelize';

// Readiness history, gate target dates, gate reviews and their actions (issue 7).
// - readiness_snapshots: one row per asset and day, and one per stage and day (asset_id NULL),
//   written by the daily job (server/services/readiness-snapshots.ts) and back-filled for the demo.
// - gate_target_dates: the day a lead wants a stage through its gate (a table of its own, so the
//   stage's own record and version are left to the stage editor).
// - gate_reviews: what was frozen when the review opened, the attendees, notes and the decision.
//   Once decided, a review never changes: a trigger refuses any UPDATE of a decided row (the
//   service answers 409 before it gets there); a correction is a new review naming the one it
//   corrects, and a review is corrected at most once (correct the correction instead).
// - gate_actions: the actions of a conditional go, tracked like findings (owner, due date, status).
export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.sequelize.query(`
    CREATE TABLE readiness_snapshots (
      id bigserial PRIMARY KEY,
      snapshot_date date NOT NULL,
      program_id uuid NOT NULL REFERENCES programs(id) ON DELETE CASCADE,
      stage_id uuid NOT NULL REFERENCES stages(id) ON DELETE CASCADE,
      asset_id uuid REFERENCES assets(id) ON DELETE CASCADE,
      -- The asset's score, or the stage's mean score (NULL for a stage without assets).
      score double precision,
      -- The asset's gate result; NULL on a stage row (its counts say it).
      result varchar(12) CHECK (result IN ('go', 'conditional', 'no-go')),
      cleared boolean,
      parts jsonb,
      open_findings_load double precision NOT NULL DEFAULT 0,
      asset_count integer NOT NULL DEFAULT 1,
      counts jsonb NOT NULL DEFAULT '{}',
      created_at timestamptz(3) NOT NULL DEFAULT now()
    );
    CREATE UNIQUE INDEX readiness_snapshots_asset_day ON readiness_snapshots (snapshot_date, asset_id) WHERE asset_id IS NOT NULL;
    CREATE UNIQUE INDEX readiness_snapshots_stage_day ON readiness_snapshots (snapshot_date, stage_id) WHERE asset_id IS NULL;
    CREATE INDEX readiness_snapshots_stage_series ON readiness_snapshots (stage_id, snapshot_date) WHERE asset_id IS NULL;
    CREATE INDEX readiness_snapshots_asset_series ON readiness_snapshots (asset_id, snapshot_date) WHERE asset_id IS NOT NULL;
    CREATE INDEX readiness_snapshots_program ON readiness_snapshots (program_id, snapshot_date);

    CREATE TABLE gate_target_dates (
      stage_id uuid PRIMARY KEY REFERENCES stages(id) ON DELETE CASCADE,
      program_id uuid NOT NULL REFERENCES programs(id) ON DELETE CASCADE,
      target_date date NOT NULL,
      set_by uuid REFERENCES users(id) ON DELETE SET NULL,
      version integer NOT NULL DEFAULT 0,
      updated_at timestamptz(3) NOT NULL DEFAULT now()
    );

    CREATE TABLE gate_reviews (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      program_id uuid NOT NULL REFERENCES programs(id) ON DELETE CASCADE,
      stage_id uuid NOT NULL REFERENCES stages(id) ON DELETE CASCADE,
      opened_by uuid REFERENCES users(id) ON DELETE SET NULL,
      opened_at timestamptz(3) NOT NULL DEFAULT now(),
      frozen_rollup jsonb NOT NULL,
      attendees jsonb NOT NULL DEFAULT '[]',
      notes text NOT NULL DEFAULT '',
      decision varchar(12) CHECK (decision IN ('go', 'conditional', 'no-go')),
      decision_notes text NOT NULL DEFAULT '',
      decided_by uuid REFERENCES users(id) ON DELETE SET NULL,
      decided_at timestamptz(3),
      corrects_review_id uuid REFERENCES gate_reviews(id) ON DELETE SET NULL,
      version integer NOT NULL DEFAULT 0,
      CONSTRAINT gate_reviews_decided CHECK ((decision IS NULL) = (decided_at IS NULL))
    );
    CREATE INDEX gate_reviews_stage ON gate_reviews (stage_id, opened_at DESC);
    CREATE INDEX gate_reviews_program ON gate_reviews (program_id, opened_at DESC);
    -- One open (undecided) review per stage at a time.
    CREATE UNIQUE INDEX gate_reviews_one_open ON gate_reviews (stage_id) WHERE decision IS NULL;
    CREATE UNIQUE INDEX gate_reviews_corrects ON gate_reviews (corrects_review_id) WHERE corrects_review_id IS NOT NULL;

    CREATE FUNCTION gate_reviews_closed() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      -- Only the cascade of a deleted user (SET NULL) may touch a decided review.
      IF OLD.decision IS NOT NULL AND (
           NEW.frozen_rollup IS DISTINCT FROM OLD.frozen_rollup OR NEW.attendees IS DISTINCT FROM OLD.attendees
           OR NEW.notes IS DISTINCT FROM OLD.notes OR NEW.decision IS DISTINCT FROM OLD.decision
           OR NEW.decision_notes IS DISTINCT FROM OLD.decision_notes OR NEW.decided_at IS DISTINCT FROM OLD.decided_at
           OR NEW.opened_at IS DISTINCT FROM OLD.opened_at OR NEW.stage_id IS DISTINCT FROM OLD.stage_id
           OR NEW.corrects_review_id IS DISTINCT FROM OLD.corrects_review_id) THEN
        RAISE EXCEPTION 'gate review % is decided and cannot be changed', OLD.id USING ERRCODE = 'check_violation';
      END IF;
      RETURN NEW;
    END $$;
    CREATE TRIGGER gate_reviews_closed BEFORE UPDATE ON gate_reviews FOR EACH ROW EXECUTE FUNCTION gate_reviews_closed();

    CREATE TABLE gate_actions (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      program_id uuid NOT NULL REFERENCES programs(id) ON DELETE CASCADE,
      review_id uuid NOT NULL REFERENCES gate_reviews(id) ON DELETE CASCADE,
      title varchar(200) NOT NULL,
      owner_id uuid REFERENCES users(id) ON DELETE SET NULL,
      due_date date NOT NULL,
      status varchar(12) NOT NULL DEFAULT 'open' CHECK (status IN ('open', 'in-work', 'done')),
      position integer NOT NULL DEFAULT 0,
      updated_by uuid REFERENCES users(id) ON DELETE SET NULL,
      version integer NOT NULL DEFAULT 0,
      created_at timestamptz(3) NOT NULL DEFAULT now(),
      updated_at timestamptz(3) NOT NULL DEFAULT now()
    );
    CREATE INDEX gate_actions_review ON gate_actions (review_id, position);
    CREATE INDEX gate_actions_owner ON gate_actions (owner_id, status);
    CREATE INDEX gate_actions_program ON gate_actions (program_id, status, due_date);
  `);
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.sequelize.query(`
    DROP TABLE IF EXISTS gate_actions;
    DROP TRIGGER IF EXISTS gate_reviews_closed ON gate_reviews;
    DROP FUNCTION IF EXISTS gate_reviews_closed();
    DROP TABLE IF EXISTS gate_reviews;
    DROP TABLE IF EXISTS gate_target_dates;
    DROP TABLE IF EXISTS readiness_snapshots;
  `);
}
