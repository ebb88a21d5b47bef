import type { QueryInterface } from 'sequelize';

// ECU software configuration (issue 5): the ECU catalogue, baselines with their targets and
// compatibility rules, the software installed now on each asset and ECU, and every flash ever
// recorded (the installed row is the newest of them; the history keeps before and after too).
// Sized for 5,000 assets x 12 ECUs: the matrix reads installed rows by asset, the reflash list
// by program, the per-asset page by (asset, ECU).
export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.sequelize.query(`
    CREATE TYPE enum_baselines_status AS ENUM ('draft', 'released', 'superseded');
    CREATE TYPE enum_software_source AS ENUM ('manual', 'import');

    CREATE TABLE ecus (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      program_id uuid NOT NULL REFERENCES programs(id) ON DELETE CASCADE,
      name varchar(120) NOT NULL,
      code varchar(12) NOT NULL,
      supplier varchar(120) NOT NULL DEFAULT '',
      -- Asset kinds that carry the ECU (the values of enum_assets_kind).
      asset_kinds text[] NOT NULL DEFAULT '{}'
        CHECK (asset_kinds <@ ARRAY['bench-rig', 'vehicle', 'component']::text[]),
      -- Stages that carry it; empty means every stage. Ids of stages of the same program.
      stage_ids uuid[] NOT NULL DEFAULT '{}',
      notes text NOT NULL DEFAULT '',
      version integer NOT NULL DEFAULT 0,
      created_at timestamptz(3) NOT NULL DEFAULT now(),
      updated_at timestamptz(3) NOT NULL DEFAULT now()
    );
    CREATE UNIQUE INDEX ecus_program_code ON ecus (program_id, code);

    CREATE TABLE baselines (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      program_id uuid NOT NULL REFERENCES programs(id) ON DELETE CASCADE,
      -- A stage can only be deleted while no asset ever was on it; its baselines go with it.
      stage_id uuid NOT NULL REFERENCES stages(id) ON DELETE CASCADE,
      name varchar(120) NOT NULL,
      release_label varchar(40) NOT NULL DEFAULT '',
      date date NOT NULL,
      status enum_baselines_status NOT NULL DEFAULT 'draft',
      notes text NOT NULL DEFAULT '',
      released_at timestamptz(3),
      released_by uuid REFERENCES users(id) ON DELETE SET NULL,
      superseded_at timestamptz(3),
      superseded_by_id uuid REFERENCES baselines(id) ON DELETE SET NULL,
      created_by uuid REFERENCES users(id) ON DELETE SET NULL,
      version integer NOT NULL DEFAULT 0,
      created_at timestamptz(3) NOT NULL DEFAULT now(),
      updated_at timestamptz(3) NOT NULL DEFAULT now(),
      CHECK (status = 'draft' OR released_at IS NOT NULL)
    );
    -- At most one released baseline per stage: releasing a new one supersedes the old in the same transaction.
    CREATE UNIQUE INDEX baselines_one_released ON baselines (stage_id) WHERE status = 'released';
    CREATE INDEX baselines_program ON baselines (program_id, stage_id, date DESC);

    CREATE TABLE baseline_targets (
      baseline_id uuid NOT NULL REFERENCES baselines(id) ON DELETE CASCADE,
      ecu_id uuid NOT NULL REFERENCES ecus(id) ON DELETE CASCADE,
      version varchar(64) NOT NULL,
      PRIMARY KEY (baseline_id, ecu_id)
    );
    CREATE INDEX baseline_targets_ecu ON baseline_targets (ecu_id);

    CREATE TABLE baseline_rules (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      baseline_id uuid NOT NULL REFERENCES baselines(id) ON DELETE CASCADE,
      position integer NOT NULL,
      when_ecu_id uuid NOT NULL REFERENCES ecus(id) ON DELETE CASCADE,
      when_min_version varchar(64) NOT NULL,
      then_ecu_id uuid NOT NULL REFERENCES ecus(id) ON DELETE CASCADE,
      range varchar(200) NOT NULL,
      note varchar(300) NOT NULL DEFAULT '',
      CHECK (when_ecu_id <> then_ecu_id)
    );
    CREATE INDEX baseline_rules_baseline ON baseline_rules (baseline_id, position);
    CREATE INDEX baseline_rules_when ON baseline_rules (when_ecu_id);
    CREATE INDEX baseline_rules_then ON baseline_rules (then_ecu_id);

    -- What is on each asset and ECU now: the newest flash.
    CREATE TABLE installed_software (
      asset_id uuid NOT NULL REFERENCES assets(id) ON DELETE CASCADE,
      ecu_id uuid NOT NULL REFERENCES ecus(id) ON DELETE CASCADE,
      program_id uuid NOT NULL REFERENCES programs(id) ON DELETE CASCADE,
      software_version varchar(64) NOT NULL CHECK (length(software_version) BETWEEN 1 AND 64),
      software_number varchar(64) NOT NULL DEFAULT '',
      hardware_number varchar(64) NOT NULL DEFAULT '',
      ecu_serial varchar(64) NOT NULL DEFAULT '',
      flashed_at timestamptz(3) NOT NULL,
      flashed_by uuid REFERENCES users(id) ON DELETE SET NULL,
      source enum_software_source NOT NULL,
      version integer NOT NULL DEFAULT 0,
      updated_at timestamptz(3) NOT NULL DEFAULT now(),
      PRIMARY KEY (asset_id, ecu_id)
    );
    CREATE INDEX installed_software_ecu ON installed_software (ecu_id);
    CREATE INDEX installed_software_program ON installed_software (program_id, asset_id);

    -- Every flash recorded, by hand or by import, oldest kept for good.
    CREATE TABLE software_flashes (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      program_id uuid NOT NULL REFERENCES programs(id) ON DELETE CASCADE,
      asset_id uuid NOT NULL REFERENCES assets(id) ON DELETE CASCADE,
      ecu_id uuid NOT NULL REFERENCES ecus(id) ON DELETE CASCADE,
      software_version varchar(64) NOT NULL,
      software_number varchar(64) NOT NULL DEFAULT '',
      hardware_number varchar(64) NOT NULL DEFAULT '',
      ecu_serial varchar(64) NOT NULL DEFAULT '',
      flashed_at timestamptz(3) NOT NULL,
      flashed_by uuid REFERENCES users(id) ON DELETE SET NULL,
      source enum_software_source NOT NULL,
      note varchar(500) NOT NULL DEFAULT '',
      recorded_by uuid REFERENCES users(id) ON DELETE SET NULL,
      recorded_at timestamptz(3) NOT NULL DEFAULT now()
    );
    CREATE INDEX software_flashes_asset ON software_flashes (asset_id, ecu_id, recorded_at DESC);
    CREATE INDEX software_flashes_ecu ON software_flashes (ecu_id);
  `);
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.sequelize.query(`
    DROP TABLE IF EXISTS software_flashes;
    DROP TABLE IF EXISTS installed_software;
    DROP TABLE IF EXISTS baseline_rules;
    DROP TABLE IF EXISTS baseline_targets;
    DROP TABLE IF EXISTS baselines;
    DROP TABLE IF EXISTS ecus;
    DROP TYPE IF EXISTS enum_software_source;
    DROP TYPE IF EXISTS enum_baselines_status;
  `);
}
