import { QueryTypes } from 'sequelize';
import request from 'supertest';
import type { GateReview, GateReviewSummary, ProgramReadiness, StageTrend } from '../../shared/schemas/readiness';
import { demoSession } from '../helpers/software';
import { makeTestApp } from '../helpers/test-app';

// `npm test` loads the demo data once before the tests (docker-free-scripts/prepare-test-db.ts); these read it only.
const t = makeTestApp();
afterAll(() => t.close());

describe('demo readiness history (issue 7: snapshots for 30 days, two past gate reviews)', () => {
  it('when the demo is loaded, then FW3 has 30 days of asset and stage snapshots and M1 today\'s only', async () => {
    const rows = await t.sequelize.query<{ code: string; days: number; stage_rows: number; asset_rows: number }>(
      `SELECT p.code, count(DISTINCT r.snapshot_date)::int AS days,
              count(*) FILTER (WHERE r.asset_id IS NULL)::int AS stage_rows, count(*) FILTER (WHERE r.asset_id IS NOT NULL)::int AS asset_rows
         FROM readiness_snapshots r JOIN programs p ON p.id = r.program_id WHERE p.code IN ('FW3', 'M1') GROUP BY p.code ORDER BY p.code`,
      { type: QueryTypes.SELECT },
    );
    const fw3 = rows.find((r) => r.code === 'FW3')!;
    // The loading day, plus the job's own snapshot if the run crossed midnight UTC.
    expect(fw3.days).toBeGreaterThanOrEqual(30);
    expect(fw3.stage_rows).toBeGreaterThanOrEqual(30 * 4);
    expect(fw3.asset_rows).toBeGreaterThanOrEqual(30 * 36);
    expect(rows.find((r) => r.code === 'M1')!.days).toBeGreaterThanOrEqual(1);
  });

  it('when the lead reads the roll-up and trends, then one stage converges with a date that meets its target and another is not converging', async () => {
    const demo = await demoSession(t, 'lead@fenwater.example');
    const rollup = (await request(t.app).get(`/api/programs/${demo.programId}/readiness`).set(demo.auth)).body as ProgramReadiness;
    const statuses = rollup.stages.map((s) => s.forecast.status);
    expect(statuses).toContain('converging');
    expect(statuses).toContain('not-converging');
    const converging = rollup.stages.find((s) => s.forecast.status === 'converging')!;
    expect(converging).toMatchObject({ name: 'Bench', meetsTarget: true });
    expect(converging.targetDate! >= converging.forecast.date!).toBe(true);
    const trend = (await request(t.app).get(`/api/stages/${converging.stageId}/trend`).set(demo.auth)).body as StageTrend;
    expect(trend.series.length).toBeGreaterThanOrEqual(30);
    expect(trend.series[0].load).toBeGreaterThan(trend.series[trend.series.length - 1].load);
    expect(trend.fit!.slopePerDay).toBeLessThan(0);
  });

  it('when the lead lists the gate reviews, then there are two decided ones: a no-go and a conditional go with actions', async () => {
    const demo = await demoSession(t, 'lead@fenwater.example');
    const list = (await request(t.app).get(`/api/gate-reviews?programId=${demo.programId}`).set(demo.auth)).body as { items: GateReviewSummary[] };
    const decisions = list.items.filter((r) => r.openedAt < new Date(Date.now() - 5 * 24 * 3600_000).toISOString()).map((r) => r.decision).sort();
    expect(decisions).toEqual(['conditional', 'no-go']);
    const conditional = list.items.find((r) => r.decision === 'conditional')!;
    const review = (await request(t.app).get(`/api/gate-reviews/${conditional.id}`).set(demo.auth)).body as GateReview;
    expect(review.actions.length).toBeGreaterThanOrEqual(2);
    expect(review.actions.every((a) => a.owner !== null)).toBe(true);
    expect(review.frozen.assets.length).toBe(review.frozen.stage.assetCount);
    expect(review.attendees.length).toBeGreaterThanOrEqual(3);
  });
});
