import { QueryTypes } from 'sequelize';
import { makeTestApp } from '../helpers/test-app';

// `npm test` loads the demo data once before the tests (docker-free-scripts/prepare-test-db.ts); these read it only.
const t = makeTestApp();
afterAll(() => t.close());

const q = <T extends object>(sql: string) => t.sequelize.query<T>(sql, { type: QueryTypes.SELECT });
const FW3 = `(SELECT id FROM programs WHERE code = 'FW3')`;

describe('demo fleet (PRODUCT.md section 8, issue 6)', () => {
  it('when the FW3 roster is read, then about a dozen people drive at mixed levels, one licence expires within 30 days and all are FW3 people', async () => {
    const [row] = await q<{ n: number; levels: number; soon: number; outsiders: number }>(
      `SELECT count(*)::int AS n, count(DISTINCT dp.driving_level)::int AS levels,
              count(*) FILTER (WHERE dp.licence_expiry >= current_date AND dp.licence_expiry < current_date + 30)::int AS soon,
              count(*) FILTER (WHERE NOT EXISTS (SELECT 1 FROM program_members pm WHERE pm.user_id = dp.user_id AND pm.program_id = ${FW3}))::int AS outsiders
         FROM driver_profiles dp JOIN users u ON u.id = dp.user_id WHERE u.email LIKE '%@fenwater.example'`,
    );
    expect(row.n).toBeGreaterThanOrEqual(10);
    expect(row.n).toBeLessThanOrEqual(16);
    expect(row.levels).toBeGreaterThanOrEqual(3);
    expect(row.soon).toBeGreaterThanOrEqual(1);
    expect(row.outsiders).toBe(0);
  });

  it('when the assignments are read, then they span about a month around today with mixed purposes, and two or more vehicles are overdue', async () => {
    const [row] = await q<{ n: number; past: number; future: number; purposes: number; overdue: number; span_days: number; returned: number }>(
      `SELECT count(*)::int AS n,
              count(*) FILTER (WHERE ends_at < now())::int AS past,
              count(*) FILTER (WHERE starts_at > now())::int AS future,
              count(DISTINCT purpose)::int AS purposes,
              count(*) FILTER (WHERE status = 'checked-out' AND ends_at < now())::int AS overdue,
              count(*) FILTER (WHERE status = 'returned')::int AS returned,
              extract(day FROM max(ends_at) - min(starts_at))::int AS span_days
         FROM assignments WHERE program_id = ${FW3}`,
    );
    expect(row.n).toBeGreaterThan(40);
    expect(row.past).toBeGreaterThan(15);
    expect(row.future).toBeGreaterThan(15);
    expect(row.purposes).toBe(5);
    expect(row.overdue).toBeGreaterThanOrEqual(2);
    expect(row.returned).toBeGreaterThan(15);
    expect(row.span_days).toBeGreaterThanOrEqual(25);
  });

  it('when the returned assignments are read, then each has a check-out and a check-in, the odometer never goes down, and each vehicle stands at least at its last check-in', async () => {
    const [row] = await q<{ missing: number; down: number; behind: number; km: number }>(
      `WITH r AS (
         SELECT a.id, a.asset_id, co.odometer_km AS out_km, ci.odometer_km AS in_km
           FROM assignments a
           LEFT JOIN assignment_checks co ON co.assignment_id = a.id AND co.kind = 'check-out'
           LEFT JOIN assignment_checks ci ON ci.assignment_id = a.id AND ci.kind = 'check-in'
          WHERE a.program_id = ${FW3} AND a.status = 'returned')
       SELECT count(*) FILTER (WHERE out_km IS NULL OR in_km IS NULL)::int AS missing,
              count(*) FILTER (WHERE in_km < out_km)::int AS down,
              (SELECT count(*) FROM assets v WHERE v.id IN (SELECT asset_id FROM r) AND v.odometer_km < (SELECT max(in_km) FROM r WHERE r.asset_id = v.id))::int AS behind,
              coalesce(sum(in_km - out_km), 0)::int AS km
         FROM r`,
    );
    expect(row).toMatchObject({ missing: 0, down: 0, behind: 0 });
    expect(row.km).toBeGreaterThan(1000);
  });

  it('when the live bookings are read, then none overlap on a vehicle or a driver, future ones avoid vehicles that are not cleared, and one level override carries its reason', async () => {
    const [row] = await q<{ clashes: number; uncleared: number; overrides: number }>(
      `WITH live AS (SELECT * FROM assignments WHERE program_id = ${FW3} AND status IN ('planned', 'checked-out'))
       SELECT (SELECT count(*) FROM live a JOIN live b ON a.id < b.id AND (a.asset_id = b.asset_id OR a.driver_id = b.driver_id)
                WHERE a.starts_at < b.ends_at AND b.starts_at < a.ends_at)::int AS clashes,
              (SELECT count(*) FROM live a WHERE a.status = 'planned' AND EXISTS (SELECT 1 FROM findings f WHERE f.asset_id = a.asset_id
                  AND f.severity = 'safety' AND f.status NOT IN ('verified', 'rejected')))::int AS uncleared,
              (SELECT count(*) FROM assignments WHERE program_id = ${FW3} AND level_override_reason IS NOT NULL)::int AS overrides`,
    );
    expect(row).toMatchObject({ clashes: 0, uncleared: 0 });
    expect(row.overrides).toBeGreaterThanOrEqual(1);
  });
});
