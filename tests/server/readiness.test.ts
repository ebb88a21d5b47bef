import request from 'supertest';
import { addDays } from '../../shared/domain/trend';
import type { AssetReadiness, ProgramReadiness } from '../../shared/schemas/readiness';
import type { ValidationTest } from '../../shared/schemas/validation';
import { createAsset, makeWorld } from '../helpers/assets';
import { addFinding, muteWorld, passRequired, setDueDate } from '../helpers/readiness';
import { flash, makeSoftwareWorld, softwareAsset } from '../helpers/software';
import { makeTestApp } from '../helpers/test-app';
import { allocate, planTest } from '../helpers/validation';

const t = makeTestApp();
afterAll(() => t.close());

const today = () => new Date().toISOString().slice(0, 10);

async function passAllocation(world: Awaited<ReturnType<typeof makeSoftwareWorld>>, test: ValidationTest, assetId: string, status: 'passed' | 'running' | 'failed') {
  const allocation = test.allocations.find((a) => a.assetId === assetId)!;
  const res = await request(t.app).patch(`/api/validation/allocations/${allocation.id}`).set(world.auth('engineer')).send({ status, version: allocation.version });
  if (res.status !== 200) throw new Error(`allocation update failed: ${res.status} ${JSON.stringify(res.body)}`);
}

describe('GET /api/assets/:id/readiness', () => {
  it('when an asset has something missing in every part, then the score, result, parts and breakdown are as worked by hand', async () => {
    const world = await makeSoftwareWorld(t);
    await muteWorld(t, world);
    // Integration car stage: three required checklist items (two passed), the released baseline FZC 4.2.1, BCM 3.2.0, INV 2.3.0, CAM_SW_0412.
    const asset = await softwareAsset(t, world);
    const required = await passRequired(t, world, asset.id, 2);
    const blocking = await addFinding(t, world, asset.id, 'blocking', 'Brake pedal travel long');
    const major = await addFinding(t, world, asset.id, 'major', 'Coolant weep at chiller');
    await setDueDate(t, major.id, addDays(today(), -2));
    await addFinding(t, world, asset.id, 'minor', 'Label missing').then((f) =>
      request(t.app).patch(`/api/findings/${f.id}`).set(world.auth('engineer')).send({ version: f.version, status: 'rejected', reason: 'Duplicate' }),
    );
    await flash(t, world, asset.id, { FZC: '4.2.1', BCM: '3.2.0', INV: '2.2.0' });
    const passed = await planTest(t, world, { stageId: world.stage.id, name: 'CAN wake-up' });
    const running = await planTest(t, world, { stageId: world.stage.id, name: 'Bus load' });
    await passAllocation(world, await allocate(t, world, passed.id, asset.id), asset.id, 'passed');
    await allocate(t, world, running.id, asset.id);

    const res = await request(t.app).get(`/api/assets/${asset.id}/readiness`).set(world.auth('driver'));
    expect(res.status).toBe(200);
    const r = res.body as AssetReadiness;
    // C 2/3; F: blocking 10 + major 3 x 2 (past due) = 16 of 20 -> 0.2; S: FZC and BCM on, INV behind, CAM missing -> 2/4; V 1/2.
    // 100 x (0.4 x 2/3 + 0.3 x 0.2 + 0.2 x 0.5 + 0.1 x 0.5) = 26.667 + 6 + 10 + 5 = 47.67.
    expect(r.parts.checklist).toBeCloseTo(2 / 3, 10);
    expect(r.parts).toMatchObject({ findings: expect.closeTo(0.2, 10), software: 0.5, validation: 0.5 });
    expect(r).toMatchObject({ score: 47.67, result: 'no-go', cleared: true, findingsLoad: 16, findingsBudget: 20, assetId: asset.id, tag: asset.tag, stage: 'Integration car' });
    expect(r.weights).toEqual({ checklist: 0.4, findings: 0.3, software: 0.2, validation: 0.1 });
    expect(r.breakdown.map((e) => [e.part, e.points, e.text])).toEqual([
      ['checklist', -13.33, '-13: one required checklist item not passed'],
      ['findings', -24, '-24: two open findings: one blocking, one major; one past due'],
      ['software', -10, '-10: two ECUs off the baseline'],
      ['validation', -5, '-5: one allocated test not passed'],
    ]);
    expect(r.breakdown.reduce((s, e) => s + Math.round(e.points * 100), 0)).toBe(Math.round((r.score - 100) * 100));
    expect(r.breakdown[0].items).toEqual([{ kind: 'checklist-item', id: required[2].id, label: required[2].title, points: -13.33 }]);
    expect(r.breakdown[1].items).toEqual([
      { kind: 'finding', id: blocking.id, label: 'Brake pedal travel long (blocking)', points: -15 },
      { kind: 'finding', id: major.id, label: 'Coolant weep at chiller (major, past due)', points: -9 },
    ]);
    expect(r.breakdown[2].items.map((i) => [i.id, i.label])).toEqual([
      [world.ecus.CAM.id, 'CAM: nothing recorded'],
      [world.ecus.INV.id, 'INV: behind the baseline'],
    ]);
    expect(r.breakdown[3].items).toEqual([{ kind: 'validation-test', id: running.id, label: 'Bus load: planned', points: -5 }]);
  });

  it('when an open safety finding stands, then the asset is not cleared and no-go, and clears once it is verified', async () => {
    const world = await makeWorld(t);
    await muteWorld(t, world);
    const asset = await createAsset(t, world, { stageId: world.stages[2].id });
    const safety = await addFinding(t, world, asset.id, 'safety', 'HV cable chafing on subframe');
    const before = (await request(t.app).get(`/api/assets/${asset.id}/readiness`).set(world.auth('lead'))).body as AssetReadiness;
    expect(before).toMatchObject({ score: 85, result: 'no-go', cleared: false, notClearedBy: [{ id: safety.id, title: 'HV cable chafing on subframe' }] });
    let current = safety;
    for (const status of ['fixed', 'verified']) {
      const res = await request(t.app).patch(`/api/findings/${current.id}`).set(world.auth('engineer')).send({ version: current.version, status });
      expect(res.status).toBe(200);
      current = res.body;
    }
    const after = (await request(t.app).get(`/api/assets/${asset.id}/readiness`).set(world.auth('lead'))).body as AssetReadiness;
    expect(after).toMatchObject({ score: 100, result: 'go', cleared: true, notClearedBy: [], breakdown: [] });
  });

  it('when the asset is of another program or the id is not a uuid, then 404', async () => {
    const mine = await makeWorld(t);
    const other = await makeWorld(t);
    const theirs = await createAsset(t, other);
    expect((await request(t.app).get(`/api/assets/${theirs.id}/readiness`).set(mine.auth('lead'))).status).toBe(404);
    expect((await request(t.app).get('/api/assets/nope/readiness').set(mine.auth('lead'))).status).toBe(404);
    expect((await request(t.app).get(`/api/assets/${theirs.id}/readiness`)).status).toBe(401);
  });
});

describe('GET /api/programs/:id/readiness', () => {
  it('when a program has assets on two stages, then each stage\'s roll-up equals the figures of its assets asked one by one', async () => {
    const world = await makeSoftwareWorld(t);
    await muteWorld(t, world);
    const car = world.stages[1];
    const proto = world.stages[2];
    const assets = [
      await softwareAsset(t, world, { tag: `RU-A-${Date.now()}` }),
      await softwareAsset(t, world, { tag: `RU-B-${Date.now()}` }),
      await softwareAsset(t, world, { tag: `RU-C-${Date.now()}` }),
      await createAsset(t, world, { stageId: proto.id, tag: `RU-D-${Date.now()}` }),
      await createAsset(t, world, { stageId: proto.id, tag: `RU-E-${Date.now()}` }),
    ];
    await passRequired(t, world, assets[0].id, 3);
    await passRequired(t, world, assets[1].id, 1);
    await flash(t, world, assets[0].id, { FZC: '4.2.1', BCM: '3.2.0', INV: '2.3.0', CAM: 'CAM_SW_0412' });
    await flash(t, world, assets[1].id, { FZC: '4.3.0', BCM: '4.0.0' });
    await addFinding(t, world, assets[1].id, 'blocking', 'Steering rack knock');
    await addFinding(t, world, assets[2].id, 'safety', 'Brake line rubbing');
    await addFinding(t, world, assets[3].id, 'major', 'Door seal torn');
    await addFinding(t, world, assets[3].id, 'minor', 'Trim clip missing');
    // A retired asset leaves the roll-up.
    const retired = await createAsset(t, world, { stageId: proto.id, tag: `RU-X-${Date.now()}` });
    await addFinding(t, world, retired.id, 'blocking', 'Old rig problem');
    await t.sequelize.query(`UPDATE assets SET status = 'retired' WHERE id = $1`, { bind: [retired.id] });

    const rollup = (await request(t.app).get(`/api/programs/${world.program.id}/readiness`).set(world.auth('technician'))).body as ProgramReadiness;
    expect(rollup.stages.map((s) => s.name)).toEqual(['Bench', 'Integration car', 'Early prototype', 'Validation build']);
    for (const stage of [car, proto]) {
      const mineAssets = assets.filter((a) => a.stageId === stage.id);
      const figures: AssetReadiness[] = [];
      for (const a of mineAssets) figures.push((await request(t.app).get(`/api/assets/${a.id}/readiness`).set(world.auth('technician'))).body);
      const s = rollup.stages.find((x) => x.stageId === stage.id)!;
      const lowest = [...figures].sort((a, b) => a.score - b.score || a.tag.localeCompare(b.tag))[0];
      expect(s.assetCount).toBe(figures.length);
      expect(s.meanScore).toBe(Math.round((figures.reduce((sum, f) => sum + f.score, 0) / figures.length) * 100) / 100);
      expect(s.lowest).toEqual({ id: lowest.assetId, tag: lowest.tag, score: lowest.score });
      expect(s.counts).toEqual({
        go: figures.filter((f) => f.result === 'go').length,
        conditional: figures.filter((f) => f.result === 'conditional').length,
        noGo: figures.filter((f) => f.result === 'no-go').length,
      });
      expect(s.notCleared).toBe(figures.filter((f) => !f.cleared).length);
      expect(s.openFindingsLoad).toBe(figures.reduce((sum, f) => sum + f.findingsLoad, 0));
      expect(s.meanParts!.software).toBeCloseTo(figures.reduce((sum, f) => sum + f.parts.software, 0) / figures.length, 10);
    }
    const carRollup = rollup.stages.find((x) => x.stageId === car.id)!;
    expect(carRollup.blockers.map((b) => [b.kind, b.count, b.assets])).toEqual([
      ['not-cleared', 1, 1],
      ['blocking-findings', 1, 1],
      ['required-items', 5, 2],
      ['ecus-off-baseline', 8, 2],
    ]);
    expect(carRollup.blockers[0].items).toEqual([expect.objectContaining({ kind: 'finding', label: 'Brake line rubbing', assetId: assets[2].id, assetTag: assets[2].tag })]);
    const empty = rollup.stages.find((x) => x.name === 'Bench')!;
    expect(empty).toMatchObject({ assetCount: 0, meanScore: null, lowest: null, forecast: { status: 'no-assets' } });
    expect(rollup.stages.find((x) => x.stageId === proto.id)!.forecast.status).toBe('insufficient-data');
  });

  it('when findings are past due, closed or without a due date, then the roll-up (which counts them in SQL) agrees with each asset asked alone', async () => {
    const world = await makeWorld(t);
    await muteWorld(t, world);
    const proto = world.stages[2];
    const a = await createAsset(t, world, { stageId: proto.id, tag: `PD-A-${Date.now()}` });
    const b = await createAsset(t, world, { stageId: proto.id, tag: `PD-B-${Date.now()}` });
    const lateBlocking = await addFinding(t, world, a.id, 'blocking', 'Z: subframe bolt torque low');
    await addFinding(t, world, a.id, 'blocking', 'A: steering rack knock');
    const lateMajor = await addFinding(t, world, a.id, 'major', 'Door seal torn');
    await addFinding(t, world, a.id, 'minor', 'Trim clip missing');
    const lateSafety = await addFinding(t, world, a.id, 'safety', 'Brake line rubbing');
    const lateMinor = await addFinding(t, world, b.id, 'minor', 'Badge loose');
    const soonMajor = await addFinding(t, world, b.id, 'major', 'Wiper parks high');
    const closed = await addFinding(t, world, b.id, 'blocking', 'Already fixed and verified');
    const yesterday = addDays(today(), -1);
    for (const f of [lateBlocking, lateMajor, lateSafety, lateMinor]) await setDueDate(t, f.id, yesterday);
    await setDueDate(t, soonMajor.id, addDays(today(), 1));
    await t.sequelize.query(`UPDATE findings SET status = 'verified' WHERE id = $1`, { bind: [closed.id] });

    const alone: AssetReadiness[] = [];
    for (const asset of [a, b]) alone.push((await request(t.app).get(`/api/assets/${asset.id}/readiness`).set(world.auth('lead'))).body);
    // By hand: A = blocking 2x10 + blocking 10 + major 2x3 + minor 1 + safety 2x10; B = minor 2x1 + major 3.
    expect(alone.map((f) => f.findingsLoad)).toEqual([57, 5]);
    const rollup = (await request(t.app).get(`/api/programs/${world.program.id}/readiness`).set(world.auth('lead'))).body as ProgramReadiness;
    const stage = rollup.stages.find((s) => s.stageId === proto.id)!;
    expect(stage.openFindingsLoad).toBe(62);
    expect(stage.meanScore).toBe(Math.round(((alone[0].score + alone[1].score) / 2) * 100) / 100);
    expect(stage.lowest).toEqual({ id: a.id, tag: a.tag, score: alone[0].score });
    expect(stage.notCleared).toBe(1);
    expect(stage.meanParts!.findings).toBeCloseTo((alone[0].parts.findings + alone[1].parts.findings) / 2, 12);
    // Blocking findings listed as the asset's breakdown lists them: the past-due one (heavier) first.
    const blocking = stage.blockers.find((x) => x.kind === 'blocking-findings')!;
    expect(blocking).toMatchObject({ count: 2, assets: 1 });
    expect(blocking.items.map((i) => i.label)).toEqual(['Z: subframe bolt torque low', 'A: steering rack knock']);
    const fromBreakdown = alone[0].breakdown.find((e) => e.part === 'findings')!.items.filter((i) => /\(blocking/.test(i.label)).map((i) => i.id);
    expect(blocking.items.map((i) => i.id)).toEqual(fromBreakdown);
    expect(stage.blockers.find((x) => x.kind === 'not-cleared')!.items).toEqual([expect.objectContaining({ id: lateSafety.id, assetId: a.id })]);
  });

  it('when a program is not mine, then 404', async () => {
    const mine = await makeWorld(t);
    const other = await makeWorld(t);
    expect((await request(t.app).get(`/api/programs/${other.program.id}/readiness`).set(mine.auth('lead'))).status).toBe(404);
    expect((await request(t.app).get(`/api/programs/${mine.program.id}/readiness`).set(mine.auth('driver'))).status).toBe(200);
  });
});
