import type { QueryInterface } from 'sequelize';

// The validation plan and test campaigns (issue 7): tests per stage with their reliability
// targets, the assets allocated to each with a result, reports stored like photos (a photo row
// with allocation_id; the newest is the allocation's report), and campaigns of planned steps
// with the hours or km done. The readiness roll-up reads test_allocations by asset.
export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.sequelize.query(`
    CREATE TYPE enum_test_allocations_status AS ENUM ('planned', 'running', 'passed', 'failed');
    CREATE TYPE enum_campaigns_kind AS ENUM ('climate', 'durability');

    CREATE TABLE validation_tests (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      program_id uuid NOT NULL REFERENCES programs(id) ON DELETE CASCADE,
      stage_id uuid NOT NULL REFERENCES stages(id) ON DELETE CASCADE,
      name varchar(160) NOT NULL,
      procedure_ref varchar(120) NOT NULL DEFAULT '',
      verifies text NOT NULL DEFAULT '',
      reliability double precision NOT NULL CHECK (reliability > 0 AND reliability < 1),
      confidence double precision NOT NULL CHECK (confidence > 0 AND confidence < 1),
      test_to_life double precision CHECK (test_to_life > 0),
      shape double precision CHECK (shape > 0),
      -- Kept with the inputs it comes from (shared/domain/reliability), so SQL can read it.
      required_samples integer NOT NULL CHECK (required_samples >= 1),
      created_by uuid REFERENCES users(id) ON DELETE SET NULL,
      version integer NOT NULL DEFAULT 0,
      created_at timestamptz(3) NOT NULL DEFAULT now(),
      updated_at timestamptz(3) NOT NULL DEFAULT now(),
      CONSTRAINT validation_tests_weibull_pair CHECK ((test_to_life IS NULL) = (shape IS NULL))
    );
    CREATE UNIQUE INDEX validation_tests_stage_name ON validation_tests (stage_id, lower(name));
    CREATE INDEX validation_tests_program ON validation_tests (program_id, stage_id);

    CREATE TABLE test_allocations (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      program_id uuid NOT NULL REFERENCES programs(id) ON DELETE CASCADE,
      test_id uuid NOT NULL REFERENCES validation_tests(id) ON DELETE CASCADE,
      asset_id uuid NOT NULL REFERENCES assets(id) ON DELETE CASCADE,
      status enum_test_allocations_status NOT NULL DEFAULT 'planned',
      result_notes text NOT NULL DEFAULT '',
      finding_id uuid REFERENCES findings(id) ON DELETE SET NULL,
      updated_by uuid REFERENCES users(id) ON DELETE SET NULL,
      version integer NOT NULL DEFAULT 0,
      created_at timestamptz(3) NOT NULL DEFAULT now(),
      updated_at timestamptz(3) NOT NULL DEFAULT now(),
      CONSTRAINT test_allocations_test_asset UNIQUE (test_id, asset_id)
    );
    CREATE INDEX test_allocations_asset ON test_allocations (asset_id, status);

    ALTER TABLE photos ADD COLUMN allocation_id uuid REFERENCES test_allocations(id) ON DELETE SET NULL;
    CREATE INDEX photos_allocation ON photos (allocation_id, created_at DESC) WHERE allocation_id IS NOT NULL;

    CREATE TABLE campaigns (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      program_id uuid NOT NULL REFERENCES programs(id) ON DELETE CASCADE,
      asset_id uuid NOT NULL REFERENCES assets(id) ON DELETE CASCADE,
      name varchar(160) NOT NULL,
      kind enum_campaigns_kind NOT NULL,
      started_at timestamptz(3),
      created_by uuid REFERENCES users(id) ON DELETE SET NULL,
      version integer NOT NULL DEFAULT 0,
      created_at timestamptz(3) NOT NULL DEFAULT now(),
      updated_at timestamptz(3) NOT NULL DEFAULT now()
    );
    CREATE INDEX campaigns_asset ON campaigns (asset_id, created_at);
    CREATE INDEX campaigns_program ON campaigns (program_id, created_at);

    CREATE TABLE campaign_steps (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      campaign_id uuid NOT NULL REFERENCES campaigns(id) ON DELETE CASCADE,
      position integer NOT NULL,
      name varchar(120) NOT NULL,
      duration_hours double precision CHECK (duration_hours > 0),
      distance_km double precision CHECK (distance_km > 0),
      temperature_c double precision CHECK (temperature_c BETWEEN -100 AND 200),
      humidity_pct double precision CHECK (humidity_pct > 0 AND humidity_pct <= 100),
      route varchar(120),
      done_hours double precision NOT NULL DEFAULT 0 CHECK (done_hours >= 0),
      done_km double precision NOT NULL DEFAULT 0 CHECK (done_km >= 0),
      version integer NOT NULL DEFAULT 0,
      created_at timestamptz(3) NOT NULL DEFAULT now(),
      updated_at timestamptz(3) NOT NULL DEFAULT now()
    );
    CREATE INDEX campaign_steps_campaign ON campaign_steps (campaign_id, position);
    -- The CSV log names steps: a name is unique within its campaign.
    CREATE UNIQUE INDEX campaign_steps_name ON campaign_steps (campaign_id, lower(name));
  `);
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.sequelize.query(`
    DROP TABLE IF EXISTS campaign_steps;
    DROP TABLE IF EXISTS campaigns;
    DROP INDEX IF EXISTS photos_allocation;
    ALTER TABLE IF EXISTS photos DROP COLUMN IF EXISTS allocation_id;
    DROP TABLE IF EXISTS test_allocations;
    DROP TABLE IF EXISTS validation_tests;
    DROP TYPE IF EXISTS enum_campaigns_kind;
    DROP TYPE IF EXISTS enum_test_allocations_status;
  `);
}
