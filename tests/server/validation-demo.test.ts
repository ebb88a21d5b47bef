import { QueryTypes } from 'sequelize';
import request from 'supertest';
import { signToken } from '../../server/middleware/auth';
import { User } from '../../server/db/models';
import type { CampaignList, ValidationTestList } from '../../shared/schemas/validation';
import { makeTestApp } from '../helpers/test-app';

// `npm test` loads the demo data once before the tests (docker-free-scripts/prepare-test-db.ts); these read it only.
const t = makeTestApp();
afterAll(() => t.close());

async function asFw3Lead() {
  const lead = (await User.findOne({ where: { email: 'lead@fenwater.example' } }))!;
  const [program] = await t.sequelize.query<{ id: string }>(`SELECT id FROM programs WHERE code = 'FW3'`, { type: QueryTypes.SELECT });
  return { auth: { Authorization: `Bearer ${signToken(t.deps, lead)}` }, programId: program.id };
}

describe('demo validation plan and campaigns (PRODUCT.md section 8)', () => {
  it('when the FW3 plan is read, then about a dozen tests over the stages with references, results and one failure linked to its blocking finding', async () => {
    const { auth, programId } = await asFw3Lead();
    const res = await request(t.app).get(`/api/validation/tests?programId=${programId}`).set(auth);
    const { tests } = res.body as ValidationTestList;
    expect(tests.length).toBeGreaterThanOrEqual(10);
    expect(tests.length).toBeLessThanOrEqual(15);
    expect(new Set(tests.map((x) => x.stageId)).size).toBe(4);
    expect(tests.find((x) => x.name === 'Damp heat cyclic (IEC 60068-2-30 Db)')).toMatchObject({ reliability: 0.9, confidence: 0.9, requiredSamples: 22, status: 'failed' });
    const statuses = new Set(tests.flatMap((x) => x.allocations.map((a) => a.status)));
    expect([...statuses].sort()).toEqual(['failed', 'passed', 'planned', 'running']);
    const failed = tests.flatMap((x) => x.allocations).filter((a) => a.status === 'failed');
    expect(failed.length).toBeGreaterThanOrEqual(1);
    for (const a of failed) {
      const finding = await request(t.app).get(`/api/findings/${a.findingId}`).set(auth);
      expect(finding.body).toMatchObject({ assetId: a.assetId, severity: 'blocking' });
    }
  });

  it('when the campaigns are read, then a climate run on a drive unit is part way through with a condensation caution', async () => {
    const { auth, programId } = await asFw3Lead();
    const { campaigns } = (await request(t.app).get(`/api/validation/campaigns?programId=${programId}`).set(auth)).body as CampaignList;
    const climate = campaigns.find((c) => c.kind === 'climate')!;
    expect(climate.assetTag).toBe('FW3-EP-008');
    expect(climate.progress.fraction).toBeGreaterThan(0.3);
    expect(climate.progress.complete).toBe(false);
    expect(climate.currentStep?.name).toMatch(/Damp heat/);
    expect(climate.projectedFinish).not.toBeNull();
    expect(climate.steps.some((s) => s.condensationRisk && /dew point/.test(s.condensationRisk))).toBe(true);
  });
});
