import type { QueryInterface } from 'sequelize';

// Fleet (issue 6): driver profiles, assignments of vehicles to drivers, and their check-out and
// check-in records; photos taken at a check link to it. The stage's minimum driving level is
// stages.min_driver_level (0002).
export async function up({ context: qi }: { context: QueryInterface }) {
  const q = (sql: string) => qi.sequelize.query(sql);

  // btree_gist lets one exclusion constraint refuse two live bookings of one vehicle (or one
  // driver) at once, even when two requests race. It is a trusted extension (PostgreSQL 13+);
  // without it the service's row locks alone serialise the bookings.
  let gist = true;
  try {
    await q('CREATE EXTENSION IF NOT EXISTS btree_gist');
  } catch {
    gist = false;
  }

  await q(`
    CREATE TABLE driver_profiles (
      user_id uuid PRIMARY KEY REFERENCES users(id) ON DELETE CASCADE,
      driving_level smallint NOT NULL DEFAULT 0 CHECK (driving_level BETWEEN 0 AND 3),
      hv_awareness boolean NOT NULL DEFAULT false,
      hv_awareness_date date,
      licence_expiry date,
      notes text NOT NULL DEFAULT '' CHECK (length(notes) <= 2000),
      version integer NOT NULL DEFAULT 0,
      created_at timestamptz(3) NOT NULL DEFAULT now(),
      updated_at timestamptz(3) NOT NULL DEFAULT now()
    );

    CREATE TYPE enum_assignments_purpose AS ENUM ('durability-route', 'ride-handling', 'climate', 'demonstration', 'other');
    CREATE TYPE enum_assignments_status AS ENUM ('planned', 'checked-out', 'returned', 'cancelled');

    CREATE TABLE assignments (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      program_id uuid NOT NULL REFERENCES programs(id) ON DELETE CASCADE,
      asset_id uuid NOT NULL REFERENCES assets(id) ON DELETE CASCADE,
      driver_id uuid NOT NULL REFERENCES users(id),
      starts_at timestamptz(3) NOT NULL,
      ends_at timestamptz(3) NOT NULL,
      purpose enum_assignments_purpose NOT NULL,
      notes text NOT NULL DEFAULT '',
      status enum_assignments_status NOT NULL DEFAULT 'planned',
      level_override_reason varchar(500),
      cancel_reason varchar(500),
      -- Set when the coordinators were e-mailed about an overdue return: once per window end.
      overdue_notified_at timestamptz(3),
      created_by uuid REFERENCES users(id) ON DELETE SET NULL,
      version integer NOT NULL DEFAULT 0,
      created_at timestamptz(3) NOT NULL DEFAULT now(),
      updated_at timestamptz(3) NOT NULL DEFAULT now(),
      CHECK (ends_at > starts_at)
    );
    CREATE INDEX assignments_asset_time ON assignments (asset_id, starts_at, ends_at);
    CREATE INDEX assignments_driver_time ON assignments (driver_id, starts_at, ends_at);
    CREATE INDEX assignments_program_time ON assignments (program_id, starts_at, ends_at);
    -- The overdue-returns job reads checked-out assignments by their end.
    CREATE INDEX assignments_out_by_end ON assignments (ends_at) WHERE status = 'checked-out';

    CREATE TYPE enum_assignment_checks_kind AS ENUM ('check-out', 'check-in');
    CREATE TABLE assignment_checks (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      program_id uuid NOT NULL REFERENCES programs(id) ON DELETE CASCADE,
      assignment_id uuid NOT NULL REFERENCES assignments(id) ON DELETE CASCADE,
      kind enum_assignment_checks_kind NOT NULL,
      odometer_km double precision NOT NULL CHECK (odometer_km >= 0),
      charge_percent real NOT NULL CHECK (charge_percent BETWEEN 0 AND 100),
      notes text NOT NULL DEFAULT '',
      damage_notes text NOT NULL DEFAULT '',
      finding_id uuid REFERENCES findings(id) ON DELETE SET NULL,
      at timestamptz(3) NOT NULL DEFAULT now(),
      by_user uuid REFERENCES users(id) ON DELETE SET NULL,
      UNIQUE (assignment_id, kind)
    );

    ALTER TABLE photos ADD COLUMN assignment_check_id uuid REFERENCES assignment_checks(id) ON DELETE SET NULL;
    CREATE INDEX photos_assignment_check ON photos (assignment_check_id) WHERE assignment_check_id IS NOT NULL;
  `);

  if (gist) {
    await q(`
      ALTER TABLE assignments ADD CONSTRAINT assignments_vehicle_no_overlap
        EXCLUDE USING gist (asset_id WITH =, tstzrange(starts_at, ends_at) WITH &&) WHERE (status IN ('planned', 'checked-out'));
      ALTER TABLE assignments ADD CONSTRAINT assignments_driver_no_overlap
        EXCLUDE USING gist (driver_id WITH =, tstzrange(starts_at, ends_at) WITH &&) WHERE (status IN ('planned', 'checked-out'));
    `);
  }
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.sequelize.query(`
    DROP INDEX IF EXISTS photos_assignment_check;
    ALTER TABLE IF EXISTS photos DROP COLUMN IF EXISTS assignment_check_id;
    DROP TABLE IF EXISTS assignment_checks;
    DROP TABLE IF EXISTS assignments;
    DROP TABLE IF EXISTS driver_profiles;
    DROP TYPE IF EXISTS enum_assignment_checks_kind;
    DROP TYPE IF EXISTS enum_assignments_status;
    DROP TYPE IF EXISTS enum_assignments_purpose;
  `);
}
