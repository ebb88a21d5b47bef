import { QueryTypes } from 'sequelize';
import { checkVin } from '../../shared/domain/vin';
import { makeTestApp } from '../helpers/test-app';

// `npm test` loads the demo data once before the tests (docker-free-scripts/prepare-test-db.ts); these read it only.
const t = makeTestApp();
afterAll(() => t.close());

const q = <T extends object>(sql: string) => t.sequelize.query<T>(sql, { type: QueryTypes.SELECT });

describe('demo data (PRODUCT.md section 8)', () => {
  it('when the demo is loaded, then FW3 has about forty assets across its four default stages and M1 has its own few', async () => {
    const rows = await q<{ code: string; stage: string; n: number }>(
      `SELECT p.code, s.name AS stage, count(a.id)::int AS n FROM programs p JOIN stages s ON s.program_id = p.id
         LEFT JOIN assets a ON a.stage_id = s.id WHERE p.code IN ('FW3', 'M1') GROUP BY p.code, s.name, s.position ORDER BY p.code, s.position`,
    );
    const fw3 = rows.filter((r) => r.code === 'FW3');
    expect(fw3.map((r) => r.stage)).toEqual(['Bench', 'Integration car', 'Early prototype', 'Validation build']);
    expect(fw3.every((r) => r.n > 0)).toBe(true);
    expect(fw3.reduce((sum, r) => sum + r.n, 0)).toBeGreaterThanOrEqual(36);
    const m1 = rows.filter((r) => r.code === 'M1').reduce((sum, r) => sum + r.n, 0);
    expect(m1).toBeGreaterThanOrEqual(4);
    expect(m1).toBeLessThanOrEqual(6);
  });

  it('when the demo VINs are checked (49 CFR 565.15(c)), then every one is well formed with a valid check digit', async () => {
    const vins = await q<{ vin: string }>(`SELECT a.vin FROM assets a JOIN programs p ON p.id = a.program_id WHERE a.vin IS NOT NULL AND p.code IN ('FW3', 'M1')`);
    expect(vins.length).toBeGreaterThan(20);
    for (const { vin } of vins) expect({ vin, ...checkVin(vin) }).toMatchObject({ vin, wellFormed: true, checkDigitValid: true });
  });

  it('when the templates are counted, then each demo stage has 20 to 40 items across several systems', async () => {
    const rows = await q<{ n: number; systems: number }>(
      `SELECT count(*)::int AS n, count(DISTINCT t.system)::int AS systems FROM template_items t JOIN programs p ON p.id = t.program_id
        WHERE p.code IN ('FW3', 'M1') GROUP BY t.stage_id`,
    );
    expect(rows).toHaveLength(8);
    for (const r of rows) {
      expect(r.n).toBeGreaterThanOrEqual(20);
      expect(r.n).toBeLessThanOrEqual(40);
      expect(r.systems).toBeGreaterThanOrEqual(5);
    }
  });

  it('when the checklists are read, then they are partly worked, with deviations linked to findings and at least one open safety finding', async () => {
    const [states] = await q<{ passed: number; na: number; deviation: number; open: number; unlinked: number }>(
      `SELECT count(*) FILTER (WHERE state = 'passed')::int AS passed, count(*) FILTER (WHERE state = 'not-applicable')::int AS na,
              count(*) FILTER (WHERE state = 'deviation')::int AS deviation, count(*) FILTER (WHERE state = 'open')::int AS open,
              count(*) FILTER (WHERE state = 'deviation' AND finding_id IS NULL)::int AS unlinked
         FROM checklist_items ci JOIN programs p ON p.id = ci.program_id WHERE p.code = 'FW3'`,
    );
    expect(states.passed).toBeGreaterThan(states.open);
    expect(states.na).toBeGreaterThan(0);
    expect(states.deviation).toBeGreaterThan(0);
    expect(states.unlinked).toBe(0);
    const safety = await q<{ tag: string }>(
      `SELECT a.tag FROM findings f JOIN assets a ON a.id = f.asset_id JOIN programs p ON p.id = f.program_id
        WHERE f.severity = 'safety' AND f.status = 'open' AND p.code = 'FW3'`,
    );
    expect(safety.length).toBeGreaterThanOrEqual(1);
    const [photos] = await q<{ n: number }>(`SELECT count(*)::int AS n FROM photos ph JOIN programs p ON p.id = ph.program_id WHERE p.code = 'FW3'`);
    expect(photos.n).toBeGreaterThan(0);
  });
});
