import { QueryTypes } from 'sequelize';
import { makeTestApp } from '../helpers/test-app';

// `npm test` loads the demo data once before the tests (docker-free-scripts/prepare-test-db.ts); these read it only.
const t = makeTestApp();
afterAll(() => t.close());

const q = <T extends object>(sql: string) => t.sequelize.query<T>(sql, { type: QueryTypes.SELECT });

describe('demo findings (PRODUCT.md section 8)', () => {
  it('when the FW3 findings are counted, then a few hundred spread over severities, statuses and most assets, with few safety ones', async () => {
    const [row] = await q<{ n: number; assets: number; safety: number; blocking: number; major: number; minor: number; open_safety: number }>(
      `SELECT count(*)::int AS n, count(DISTINCT f.asset_id)::int AS assets,
              count(*) FILTER (WHERE severity = 'safety')::int AS safety, count(*) FILTER (WHERE severity = 'blocking')::int AS blocking,
              count(*) FILTER (WHERE severity = 'major')::int AS major, count(*) FILTER (WHERE severity = 'minor')::int AS minor,
              count(*) FILTER (WHERE severity = 'safety' AND status NOT IN ('verified', 'rejected'))::int AS open_safety
         FROM findings f JOIN programs p ON p.id = f.program_id WHERE p.code = 'FW3'`,
    );
    expect(row.n).toBeGreaterThanOrEqual(250);
    expect(row.n).toBeLessThanOrEqual(500);
    expect(row.assets).toBeGreaterThanOrEqual(30);
    expect(row.safety).toBeLessThan(row.n * 0.06);
    expect(row.open_safety).toBeGreaterThanOrEqual(1);
    expect(row.open_safety).toBeLessThanOrEqual(5);
    expect(row.blocking).toBeGreaterThan(row.safety);
    expect(row.major + row.minor).toBeGreaterThan(row.n * 0.6);
    const statuses = await q<{ status: string }>(`SELECT DISTINCT status FROM findings f JOIN programs p ON p.id = f.program_id WHERE p.code = 'FW3'`);
    expect(statuses.map((s) => s.status).sort()).toEqual(['fixed', 'in-work', 'open', 'rejected', 'verified']);
  });

  it('when ages and due dates are read, then they span about six weeks and some open findings are overdue', async () => {
    const [row] = await q<{ oldest_days: number; overdue: number; active: number }>(
      `SELECT extract(day FROM now() - min(f.created_at))::int AS oldest_days,
              count(*) FILTER (WHERE f.due_date < current_date AND f.status NOT IN ('verified', 'rejected'))::int AS overdue,
              count(*) FILTER (WHERE f.status NOT IN ('verified', 'rejected'))::int AS active
         FROM findings f JOIN programs p ON p.id = f.program_id WHERE p.code = 'FW3'`,
    );
    expect(row.oldest_days).toBeGreaterThanOrEqual(30);
    expect(row.overdue).toBeGreaterThan(5);
    expect(row.overdue).toBeLessThan(row.active / 2);
  });

  it('when owners, watchers and comment authors are read, then all are FW3 people, and every finding has its history', async () => {
    const [row] = await q<{ outsiders: number; comments: number; watchers: number; without_history: number; rejected_without_reason: number }>(
      `WITH fw3 AS (SELECT f.* FROM findings f JOIN programs p ON p.id = f.program_id WHERE p.code = 'FW3')
       SELECT (SELECT count(*) FROM fw3 WHERE owner_id IS NOT NULL AND NOT EXISTS
                 (SELECT 1 FROM program_members pm WHERE pm.user_id = fw3.owner_id AND pm.program_id = fw3.program_id))::int AS outsiders,
              (SELECT count(*) FROM finding_comments c WHERE c.finding_id IN (SELECT id FROM fw3))::int AS comments,
              (SELECT count(*) FROM finding_watchers w WHERE w.finding_id IN (SELECT id FROM fw3))::int AS watchers,
              (SELECT count(*) FROM fw3 WHERE NOT EXISTS
                 (SELECT 1 FROM history_entries h WHERE h.entity_type = 'finding' AND h.entity_id = fw3.id::text AND h.action = 'created'))::int AS without_history,
              (SELECT count(*) FROM fw3 WHERE status = 'rejected' AND reject_reason IS NULL AND checklist_item_id IS NULL)::int AS rejected_without_reason`,
    );
    expect(row).toMatchObject({ outsiders: 0, without_history: 0, rejected_without_reason: 0 });
    expect(row.comments).toBeGreaterThan(100);
    expect(row.watchers).toBeGreaterThan(100);
  });
});
