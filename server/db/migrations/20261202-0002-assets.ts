import type { QueryInterface } from 'sequelize';

// Stages, checklist templates, assets, stage visits, checklist items, findings and photos.
// Timestamps keep milliseconds only (timestamptz(3)) so that a value read into JavaScript and
// sent back in a paging cursor compares equal to the stored one.
export async function up({ context: qi }: { context: QueryInterface }) {
  const q = (sql: string) => qi.sequelize.query(sql);

  // pg_trgm makes the free-text search (ILIKE '%...%') use an index. It is a trusted extension
  // (PostgreSQL 13+), so a database owner may create it; without it, the search scans.
  let trigram = true;
  try {
    await q('CREATE EXTENSION IF NOT EXISTS pg_trgm');
  } catch {
    trigram = false;
  }

  await q(`
    CREATE TYPE enum_system AS ENUM ('body', 'chassis', 'high-voltage', 'low-voltage-harness', 'thermal', 'software', 'safety');
    CREATE TYPE enum_assets_kind AS ENUM ('bench-rig', 'vehicle', 'component');
    CREATE TYPE enum_assets_status AS ENUM ('in-build', 'in-test', 'available', 'assigned', 'down', 'retired');
    CREATE TYPE enum_checklist_items_state AS ENUM ('open', 'passed', 'deviation', 'not-applicable');
    CREATE TYPE enum_findings_severity AS ENUM ('safety', 'blocking', 'major', 'minor');
    CREATE TYPE enum_findings_status AS ENUM ('open', 'in-work', 'fixed', 'verified', 'rejected');

    CREATE TABLE stages (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      program_id uuid NOT NULL REFERENCES programs(id) ON DELETE CASCADE,
      name varchar(60) NOT NULL,
      position integer NOT NULL,
      retired boolean NOT NULL DEFAULT false,
      gate jsonb NOT NULL,
      min_driver_level smallint NOT NULL DEFAULT 0 CHECK (min_driver_level BETWEEN 0 AND 3),
      version integer NOT NULL DEFAULT 0,
      created_at timestamptz(3) NOT NULL DEFAULT now(),
      updated_at timestamptz(3) NOT NULL DEFAULT now()
    );
    CREATE UNIQUE INDEX stages_program_name ON stages (program_id, lower(name));
    CREATE INDEX stages_program_position ON stages (program_id, position);

    CREATE TABLE template_items (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      program_id uuid NOT NULL REFERENCES programs(id) ON DELETE CASCADE,
      stage_id uuid NOT NULL REFERENCES stages(id) ON DELETE CASCADE,
      system enum_system NOT NULL,
      title varchar(160) NOT NULL,
      instructions text NOT NULL DEFAULT '',
      expected_part_number varchar(60) NOT NULL DEFAULT '',
      expected_revision varchar(20) NOT NULL DEFAULT '',
      required_for_gate boolean NOT NULL DEFAULT true,
      hv_qualified boolean NOT NULL DEFAULT false,
      position integer NOT NULL,
      retired boolean NOT NULL DEFAULT false,
      version integer NOT NULL DEFAULT 0,
      created_at timestamptz(3) NOT NULL DEFAULT now(),
      updated_at timestamptz(3) NOT NULL DEFAULT now()
    );
    CREATE INDEX template_items_stage ON template_items (stage_id, position);

    CREATE TABLE assets (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      program_id uuid NOT NULL REFERENCES programs(id) ON DELETE CASCADE,
      tag varchar(32) NOT NULL,
      kind enum_assets_kind NOT NULL,
      stage_id uuid NOT NULL REFERENCES stages(id),
      status enum_assets_status NOT NULL DEFAULT 'in-build',
      location varchar(80) NOT NULL DEFAULT '',
      vin varchar(17),
      odometer_km double precision NOT NULL DEFAULT 0 CHECK (odometer_km >= 0),
      build_date date,
      notes text NOT NULL DEFAULT '',
      created_by uuid REFERENCES users(id) ON DELETE SET NULL,
      version integer NOT NULL DEFAULT 0,
      created_at timestamptz(3) NOT NULL DEFAULT now(),
      updated_at timestamptz(3) NOT NULL DEFAULT now(),
      search text GENERATED ALWAYS AS (tag || ' ' || coalesce(vin, '') || ' ' || location || ' ' || notes) STORED
    );
    CREATE UNIQUE INDEX assets_program_tag ON assets (program_id, tag);
    -- Keyset paging: one index per sort order, each ending in the tie-breakers.
    CREATE INDEX assets_program_updated ON assets (program_id, updated_at, id);
    CREATE INDEX assets_program_status ON assets (program_id, status, tag, id);
    CREATE INDEX assets_program_location ON assets (program_id, location, tag, id);
    CREATE INDEX assets_program_stage ON assets (program_id, stage_id, tag);
    CREATE INDEX assets_stage ON assets (stage_id);
    CREATE INDEX assets_vin ON assets (vin) WHERE vin IS NOT NULL;

    CREATE TABLE stage_visits (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      program_id uuid NOT NULL REFERENCES programs(id) ON DELETE CASCADE,
      asset_id uuid NOT NULL REFERENCES assets(id) ON DELETE CASCADE,
      stage_id uuid NOT NULL REFERENCES stages(id),
      entered_at timestamptz(3) NOT NULL DEFAULT now(),
      left_at timestamptz(3),
      entered_by uuid REFERENCES users(id) ON DELETE SET NULL
    );
    -- At most one open visit per asset: its checklist is the current one.
    CREATE UNIQUE INDEX stage_visits_open ON stage_visits (asset_id) WHERE left_at IS NULL;
    CREATE INDEX stage_visits_asset ON stage_visits (asset_id, entered_at);
    CREATE INDEX stage_visits_stage ON stage_visits (stage_id);

    CREATE TABLE checklist_items (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      program_id uuid NOT NULL REFERENCES programs(id) ON DELETE CASCADE,
      asset_id uuid NOT NULL REFERENCES assets(id) ON DELETE CASCADE,
      visit_id uuid NOT NULL REFERENCES stage_visits(id) ON DELETE CASCADE,
      stage_id uuid NOT NULL REFERENCES stages(id),
      template_item_id uuid REFERENCES template_items(id) ON DELETE SET NULL,
      system enum_system NOT NULL,
      title varchar(160) NOT NULL,
      instructions text NOT NULL DEFAULT '',
      expected_part_number varchar(60) NOT NULL DEFAULT '',
      expected_revision varchar(20) NOT NULL DEFAULT '',
      required_for_gate boolean NOT NULL DEFAULT true,
      hv_qualified boolean NOT NULL DEFAULT false,
      position integer NOT NULL,
      state enum_checklist_items_state NOT NULL DEFAULT 'open',
      fitted_part_number varchar(60) NOT NULL DEFAULT '',
      fitted_revision varchar(20) NOT NULL DEFAULT '',
      notes text NOT NULL DEFAULT '',
      na_reason varchar(500) NOT NULL DEFAULT '',
      finding_id uuid,
      updated_by uuid REFERENCES users(id) ON DELETE SET NULL,
      version integer NOT NULL DEFAULT 0,
      created_at timestamptz(3) NOT NULL DEFAULT now(),
      updated_at timestamptz(3) NOT NULL DEFAULT now()
    );
    CREATE INDEX checklist_items_visit ON checklist_items (visit_id, position);
    CREATE INDEX checklist_items_asset ON checklist_items (asset_id);

    CREATE TABLE findings (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      program_id uuid NOT NULL REFERENCES programs(id) ON DELETE CASCADE,
      asset_id uuid REFERENCES assets(id) ON DELETE CASCADE,
      checklist_item_id uuid REFERENCES checklist_items(id) ON DELETE SET NULL,
      title varchar(160) NOT NULL,
      description text NOT NULL DEFAULT '',
      system enum_system,
      severity enum_findings_severity NOT NULL DEFAULT 'major',
      status enum_findings_status NOT NULL DEFAULT 'open',
      owner_id uuid REFERENCES users(id) ON DELETE SET NULL,
      due_date date,
      created_by uuid REFERENCES users(id) ON DELETE SET NULL,
      version integer NOT NULL DEFAULT 0,
      created_at timestamptz(3) NOT NULL DEFAULT now(),
      updated_at timestamptz(3) NOT NULL DEFAULT now()
    );
    CREATE INDEX findings_asset ON findings (asset_id, severity, status);
    CREATE INDEX findings_program_status ON findings (program_id, status);
    CREATE INDEX findings_item ON findings (checklist_item_id);
    ALTER TABLE checklist_items
      ADD CONSTRAINT checklist_items_finding_fk FOREIGN KEY (finding_id) REFERENCES findings(id) ON DELETE SET NULL;

    CREATE TABLE photos (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      program_id uuid NOT NULL REFERENCES programs(id) ON DELETE CASCADE,
      asset_id uuid NOT NULL REFERENCES assets(id) ON DELETE CASCADE,
      checklist_item_id uuid REFERENCES checklist_items(id) ON DELETE SET NULL,
      finding_id uuid REFERENCES findings(id) ON DELETE SET NULL,
      content_type varchar(40) NOT NULL,
      bytes integer NOT NULL,
      width integer,
      height integer,
      s3_key varchar(300) NOT NULL,
      thumb_key varchar(300) NOT NULL,
      sha256 char(64) NOT NULL,
      idempotency_key varchar(100),
      created_by uuid REFERENCES users(id) ON DELETE SET NULL,
      created_at timestamptz(3) NOT NULL DEFAULT now()
    );
    CREATE INDEX photos_asset ON photos (asset_id, created_at DESC);
    CREATE INDEX photos_item ON photos (checklist_item_id) WHERE checklist_item_id IS NOT NULL;
    CREATE INDEX photos_finding ON photos (finding_id) WHERE finding_id IS NOT NULL;
    -- A retried upload carries the same key: one photo per user and key.
    CREATE UNIQUE INDEX photos_idempotency ON photos (created_by, idempotency_key) WHERE idempotency_key IS NOT NULL;
  `);

  if (trigram) await q('CREATE INDEX assets_search_trgm ON assets USING gin (search gin_trgm_ops)');
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.sequelize.query(`
    DROP TABLE IF EXISTS photos;
    ALTER TABLE IF EXISTS checklist_items DROP CONSTRAINT IF EXISTS checklist_items_finding_fk;
    DROP TABLE IF EXISTS findings;
    DROP TABLE IF EXISTS checklist_items;
    DROP TABLE IF EXISTS stage_visits;
    DROP TABLE IF EXISTS assets;
    DROP TABLE IF EXISTS template_items;
    DROP TABLE IF EXISTS stages;
    DROP TYPE IF EXISTS enum_findings_status;
    DROP TYPE IF EXISTS enum_findings_severity;
    DROP TYPE IF EXISTS enum_checklist_items_state;
    DROP TYPE IF EXISTS enum_assets_status;
    DROP TYPE IF EXISTS enum_assets_kind;
    DROP TYPE IF EXISTS enum_system;
  `);
}
