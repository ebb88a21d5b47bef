import type { QueryInterface } from 'sequelize';

// Findings beyond the minimal table of 0002: reject reason, watchers, comments, the list's
// indexes, the idempotency keys of retried POSTs and the persisted schedule of the job loop.
// Finding photos reuse photos.finding_id (created by 0002).
export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.sequelize.query(`
    ALTER TABLE findings
      ADD COLUMN reject_reason varchar(500),
      ADD COLUMN idempotency_key varchar(100);
    -- A retried create that slipped past the idempotency table still makes one finding per user and key.
    CREATE UNIQUE INDEX findings_idempotency ON findings (created_by, idempotency_key) WHERE idempotency_key IS NOT NULL;
    -- Keyset paging of the list: one index per sort, each ending in the id.
    CREATE INDEX findings_program_due ON findings (program_id, (coalesce(due_date, 'infinity'::date)), id);
    CREATE INDEX findings_program_created ON findings (program_id, created_at, id);
    CREATE INDEX findings_program_updated ON findings (program_id, updated_at, id);
    CREATE INDEX findings_owner ON findings (owner_id) WHERE owner_id IS NOT NULL;
    CREATE INDEX findings_created_by ON findings (created_by);
    -- The overdue digest reads the open findings by due date.
    CREATE INDEX findings_due_open ON findings (due_date) WHERE due_date IS NOT NULL AND status NOT IN ('verified', 'rejected');

    CREATE TABLE finding_watchers (
      finding_id uuid NOT NULL REFERENCES findings(id) ON DELETE CASCADE,
      user_id uuid NOT NULL REFERENCES users(id) ON DELETE CASCADE,
      created_at timestamptz(3) NOT NULL DEFAULT now(),
      PRIMARY KEY (finding_id, user_id)
    );
    CREATE INDEX finding_watchers_user ON finding_watchers (user_id);

    CREATE TABLE finding_comments (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      program_id uuid NOT NULL REFERENCES programs(id) ON DELETE CASCADE,
      finding_id uuid NOT NULL REFERENCES findings(id) ON DELETE CASCADE,
      author_id uuid REFERENCES users(id) ON DELETE SET NULL,
      body text NOT NULL CHECK (length(body) BETWEEN 1 AND 4000),
      idempotency_key varchar(100),
      created_at timestamptz(3) NOT NULL DEFAULT now()
    );
    CREATE INDEX finding_comments_finding ON finding_comments (finding_id, created_at, id);
    CREATE UNIQUE INDEX finding_comments_idempotency ON finding_comments (author_id, idempotency_key) WHERE idempotency_key IS NOT NULL;

    -- The first answer to a POST sent with an Idempotency-Key, per user and key. status_code is
    -- null while the first request runs.
    CREATE TABLE idempotency_keys (
      id bigserial PRIMARY KEY,
      user_id uuid NOT NULL REFERENCES users(id) ON DELETE CASCADE,
      key varchar(100) NOT NULL,
      method varchar(10) NOT NULL,
      path varchar(300) NOT NULL,
      request_hash char(64) NOT NULL,
      status_code integer,
      response jsonb,
      created_at timestamptz(3) NOT NULL DEFAULT now(),
      completed_at timestamptz(3)
    );
    CREATE UNIQUE INDEX idempotency_keys_user_key ON idempotency_keys (user_id, key);
    CREATE INDEX idempotency_keys_created ON idempotency_keys (created_at);

    -- One row per recurring job; the loop takes a due row with FOR UPDATE SKIP LOCKED, so one
    -- instance runs it, and next_run_at survives restarts.
    CREATE TABLE scheduled_jobs (
      name varchar(60) PRIMARY KEY,
      next_run_at timestamptz(3) NOT NULL,
      last_run_at timestamptz(3),
      last_error text,
      run_count integer NOT NULL DEFAULT 0,
      updated_at timestamptz(3) NOT NULL DEFAULT now()
    );
  `);
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.sequelize.query(`
    DROP TABLE IF EXISTS scheduled_jobs;
    DROP TABLE IF EXISTS idempotency_keys;
    DROP TABLE IF EXISTS finding_comments;
    DROP TABLE IF EXISTS finding_watchers;
    DROP INDEX IF EXISTS findings_due_open;
    DROP INDEX IF EXISTS findings_created_by;
    DROP INDEX IF EXISTS findings_owner;
    DROP INDEX IF EXISTS findings_program_updated;
    DROP INDEX IF EXISTS findings_program_created;
    DROP INDEX IF EXISTS findings_program_due;
    DROP INDEX IF EXISTS findings_idempotency;
    ALTER TABLE findings DROP COLUMN IF EXISTS idempotency_key, DROP COLUMN IF EXISTS reject_reason;
  `);
}
