import { QueryTypes } from 'sequelize';
import request from 'supertest';
import { registerJobs, runDueJobs } from '../../server/services/jobs';
import { READINESS_JOBS, SNAPSHOT_HOUR_UTC } from '../../server/services/readiness-jobs';
import { takeSnapshot } from '../../server/services/readiness-snapshots';
import { addDays } from '../../shared/domain/trend';
import type { AssetReadiness, ProgramReadiness, StageTrend, TargetDateResult } from '../../shared/schemas/readiness';
import { createAsset, makeWorld, type World } from '../helpers/assets';
import { addFinding, insertStageSeries, muteWorld } from '../helpers/readiness';
import { makeTestApp, uid } from '../helpers/test-app';

const t = makeTestApp();
afterAll(() => t.close());

const today = () => new Date().toISOString().slice(0, 10);

type SnapshotRow = { asset_id: string | null; stage_id: string; score: number | null; result: string | null; cleared: boolean | null; open_findings_load: number; asset_count: number; counts: object };
const snapshotRows = (world: World, date: string) =>
  t.sequelize.query<SnapshotRow>(
    `SELECT asset_id, stage_id, score, result, cleared, open_findings_load, asset_count, counts FROM readiness_snapshots
      WHERE program_id = $1 AND snapshot_date = $2 ORDER BY asset_id NULLS FIRST, stage_id`,
    { bind: [world.program.id, date], type: QueryTypes.SELECT },
  );

/**
 * Two vehicles on the early-prototype stage, which has no checklist template, no baseline and no
 * tests in a test world: C, S and V are 1, so the target load of a go is 2 x 20 x (1 - 0.2 / 0.3)
 * = 13.33 (shared/domain/trend.ts).
 */
async function trendWorld() {
  const world = await makeWorld(t);
  await muteWorld(t, world);
  const stage = world.stages[2];
  const a = await createAsset(t, world, { stageId: stage.id, tag: `TR-${uid()}` });
  const b = await createAsset(t, world, { stageId: stage.id, tag: `TR-${uid()}` });
  await addFinding(t, world, a.id, 'blocking');
  await addFinding(t, world, b.id, 'major');
  return { world, stage, assets: [a, b] };
}

describe('daily snapshots', () => {
  it('when a snapshot is taken, then each asset and stage has one row for the day with the live figures, and a second one the same day replaces them', async () => {
    const { world, stage, assets } = await trendWorld();
    const asOf = new Date();
    expect(await takeSnapshot(t.deps, asOf, undefined, [world.program.id])).toEqual({ programs: 1, assets: 2, stages: 4 });
    const rows = await snapshotRows(world, today());
    const live: AssetReadiness[] = [];
    for (const a of assets) live.push((await request(t.app).get(`/api/assets/${a.id}/readiness`).set(world.auth('lead'))).body);
    expect(rows.filter((r) => r.asset_id).map((r) => [r.asset_id, r.score, r.result, r.cleared, r.open_findings_load]).sort()).toEqual(
      live.map((r) => [r.assetId, r.score, r.result, r.cleared, r.findingsLoad]).sort(),
    );
    const stageRow = rows.find((r) => r.asset_id === null && r.stage_id === stage.id)!;
    expect(stageRow).toMatchObject({ score: (85 + 95.5) / 2, open_findings_load: 13, asset_count: 2, counts: { go: 1, conditional: 1, noGo: 0 } });
    expect(rows.filter((r) => r.asset_id === null)).toHaveLength(4);

    await addFinding(t, world, assets[1].id, 'minor');
    await takeSnapshot(t.deps, asOf, undefined, [world.program.id]);
    const again = await snapshotRows(world, today());
    expect(again).toHaveLength(6);
    expect(again.find((r) => r.asset_id === null && r.stage_id === stage.id)!.open_findings_load).toBe(14);
  });

  it('when the daily job is due, then it snapshots through the job loop and is next due at 23:00 UTC', async () => {
    const { world } = await trendWorld();
    const job = { ...READINESS_JOBS[0], name: `readiness-snapshot-${uid()}` };
    const start = new Date(Date.UTC(2026, 11, 2, 12));
    await registerJobs(t.deps, [job], start);
    const due = new Date();
    await t.sequelize.query(`UPDATE scheduled_jobs SET next_run_at = $2 WHERE name = $1`, { bind: [job.name, new Date(due.getTime() - 60_000)] });
    expect(await runDueJobs(t.deps, [job], due)).toEqual([job.name]);
    expect((await snapshotRows(world, today())).filter((r) => r.asset_id)).toHaveLength(2);
    const [row] = await t.sequelize.query<{ next_run_at: Date }>(`SELECT next_run_at FROM scheduled_jobs WHERE name = $1`, { bind: [job.name], type: QueryTypes.SELECT });
    expect(row.next_run_at.getUTCHours()).toBe(SNAPSHOT_HOUR_UTC);
    expect(row.next_run_at.getTime()).toBeGreaterThan(due.getTime());
    expect(READINESS_JOBS[0].name).toBe('readiness-snapshot');
  });
});

describe('GET /api/stages/:id/trend and PUT /api/stages/:id/target-date', () => {
  it('when the load fell 5 a day for 14 days, then the trend fits the line and forecasts the day the target load is reached', async () => {
    const { world, stage } = await trendWorld();
    // 100 - 5 x over the window, today 35; target 13.33 at x = 17.33: day 18 of the window, 5 days after today.
    await insertStageSeries(t, world, stage.id, today(), Array.from({ length: 14 }, (_, i) => 100 - 5 * i));
    await insertStageSeries(t, world, stage.id, addDays(today(), -14), [400, 300]);
    const res = await request(t.app).get(`/api/stages/${stage.id}/trend`).set(world.auth('driver'));
    expect(res.status).toBe(200);
    const trend = res.body as StageTrend;
    expect(trend.series).toHaveLength(16);
    expect(trend.series[15]).toMatchObject({ date: today(), load: 35, meanScore: 70, assetCount: 2, counts: { go: 0, conditional: 1, noGo: 1 } });
    expect(trend.fit!.slopePerDay).toBeCloseTo(-5, 10);
    expect(trend.fit!.intercept).toBeCloseTo(100, 10);
    expect(trend.fit!.line).toEqual([
      { date: addDays(today(), -13), load: expect.closeTo(100, 8) },
      { date: today(), load: expect.closeTo(35, 8) },
    ]);
    expect(trend.forecast).toMatchObject({ status: 'converging', date: addDays(today(), 5), currentLoad: 35, points: 14 });
    expect(trend.forecast.targetLoad).toBeCloseTo(40 / 3, 10);
    expect(trend.forecast.text).toBe(`At this rate the stage reaches its threshold on ${addDays(today(), 5)}.`);
    expect(trend.meetsTarget).toBeNull();

    const met = await request(t.app).put(`/api/stages/${stage.id}/target-date`).set(world.auth('lead')).send({ date: addDays(today(), 5) });
    expect(met.status).toBe(200);
    expect(met.body as TargetDateResult).toMatchObject({ stageId: stage.id, targetDate: addDays(today(), 5), meetsTarget: true, forecast: { status: 'converging' } });
    const missed = await request(t.app).put(`/api/stages/${stage.id}/target-date`).set(world.auth('lead')).send({ date: addDays(today(), 4) });
    expect(missed.body).toMatchObject({ targetDate: addDays(today(), 4), meetsTarget: false });
    const rollup = (await request(t.app).get(`/api/programs/${world.program.id}/readiness`).set(world.auth('lead'))).body as ProgramReadiness;
    expect(rollup.stages.find((s) => s.stageId === stage.id)).toMatchObject({ targetDate: addDays(today(), 4), meetsTarget: false, forecast: { date: addDays(today(), 5) } });
    const cleared = await request(t.app).put(`/api/stages/${stage.id}/target-date`).set(world.auth('lead')).send({ date: null });
    expect(cleared.body).toMatchObject({ targetDate: null, meetsTarget: null });

    const [history] = (await t.sequelize.query(
      `SELECT action, before, after FROM history_entries WHERE entity_type = 'stage' AND entity_id = $1 ORDER BY id`,
      { bind: [stage.id] },
    )) as [Array<{ action: string; before: object; after: object }>, unknown];
    expect(history.map((h) => [h.action, h.before, h.after])).toEqual([
      ['gate-target-date-set', { gateTargetDate: null }, { gateTargetDate: addDays(today(), 5) }],
      ['gate-target-date-set', { gateTargetDate: addDays(today(), 5) }, { gateTargetDate: addDays(today(), 4) }],
      ['gate-target-date-set', { gateTargetDate: addDays(today(), 4) }, { gateTargetDate: null }],
    ]);
  });

  it('when the load rises, then it is not converging and a target date is not met', async () => {
    const { world, stage } = await trendWorld();
    await insertStageSeries(t, world, stage.id, today(), [20, 22, 21, 25, 27, 30]);
    const res = await request(t.app).put(`/api/stages/${stage.id}/target-date`).set(world.auth('lead')).send({ date: addDays(today(), 60) });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ meetsTarget: false, forecast: { status: 'not-converging', date: null, text: 'Not converging: the open-findings load is not falling.' } });
    const trend = (await request(t.app).get(`/api/stages/${stage.id}/trend`).set(world.auth('lead'))).body as StageTrend;
    expect(trend.fit!.slopePerDay).toBeGreaterThan(0);
    expect(trend).toMatchObject({ targetDate: addDays(today(), 60), meetsTarget: false });
  });

  it.each(['technician', 'engineer', 'coordinator', 'driver', 'admin'] as const)('when someone with the %s role sets a target date, then 403 and nothing changes', async (role) => {
    const { world, stage } = await trendWorld();
    const res = await request(t.app).put(`/api/stages/${stage.id}/target-date`).set(world.auth(role)).send({ date: addDays(today(), 30) });
    expect(res.status).toBe(403);
    const [rows] = (await t.sequelize.query(`SELECT 1 FROM gate_target_dates WHERE stage_id = $1`, { bind: [stage.id] })) as [unknown[], unknown];
    expect(rows).toHaveLength(0);
  });

  it('when the date is in the past or not a date, then 400 naming date', async () => {
    const { world, stage } = await trendWorld();
    for (const date of [addDays(today(), -3), '2026-13-01', 'soon']) {
      const res = await request(t.app).put(`/api/stages/${stage.id}/target-date`).set(world.auth('lead')).send({ date });
      expect({ date, status: res.status, fields: Object.keys(res.body.error.details.fields) }).toEqual({ date, status: 400, fields: ['date'] });
    }
  });

  it('when the stage is of another program, then 404 for the trend and the target date, even with a bad body', async () => {
    const mine = await makeWorld(t);
    const other = await makeWorld(t);
    const stage = other.stages[0];
    expect((await request(t.app).get(`/api/stages/${stage.id}/trend`).set(mine.auth('lead'))).status).toBe(404);
    expect((await request(t.app).put(`/api/stages/${stage.id}/target-date`).set(mine.auth('lead')).send({ date: addDays(today(), 9) })).status).toBe(404);
    expect((await request(t.app).put(`/api/stages/${stage.id}/target-date`).set(mine.auth('lead')).send({ nonsense: true })).status).toBe(404);
  });
});
