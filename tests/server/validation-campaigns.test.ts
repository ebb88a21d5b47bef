import request from 'supertest';
import type { Campaign } from '../../shared/schemas/validation';
import { createAsset, makeWorld, type World } from '../helpers/assets';
import { makeTestApp } from '../helpers/test-app';
import { startCampaign } from '../helpers/validation';

const t = makeTestApp();
afterAll(() => t.close());

let world: World;
beforeAll(async () => {
  world = await makeWorld(t);
});

const stepDone = (c: Campaign) => c.steps.map((s) => [s.name, s.doneHours, s.doneKm]);

describe('test campaigns', () => {
  it('when a technician plans a climate run, then the steps carry dew points and the cold step after damp heat carries the condensation caution', async () => {
    const asset = await createAsset(t, world);
    const c = await startCampaign(t, world, asset.id);
    expect(c).toMatchObject({ assetId: asset.id, assetTag: asset.tag, kind: 'climate', startedAt: null, projectedFinish: null, version: 0 });
    expect(c.progress).toEqual({ unit: 'hours', done: 0, planned: 70, fraction: 0, complete: false });
    expect(c.currentStep).toMatchObject({ name: 'Cold soak -20 °C', index: 0 });
    // 40 degC at 85 %RH: 36.99 degC (Magnus, Alduchov-Eskridge; by hand in tests/shared/dew-point.test.ts).
    expect(c.steps.map((s) => s.dewPointC)).toEqual([null, null, 36.99, null]);
    expect(c.steps.map((s) => s.condensationRisk === null)).toEqual([true, true, true, false]);
    expect(c.steps[3].condensationRisk).toMatch(/37 °C dew point.*Damp heat/);
    const listed = await request(t.app).get(`/api/assets/${asset.id}/campaigns`).set(world.auth('driver'));
    expect(listed.body.campaigns.map((x: Campaign) => x.id)).toEqual([c.id]);
  });

  it('when a driver or coordinator plans a campaign, then 403', async () => {
    const asset = await createAsset(t, world);
    for (const role of ['driver', 'coordinator'] as const) {
      const res = await request(t.app).post(`/api/assets/${asset.id}/campaigns`).set(world.auth(role)).send({ name: 'X', kind: 'climate', steps: [{ name: 'A', durationHours: 1 }] });
      expect(res.status).toBe(403);
    }
  });

  it.each([
    ['a climate step without hours', { kind: 'climate', steps: [{ name: 'A' }] }, 'steps.0.durationHours'],
    ['a durability step without km', { kind: 'durability', steps: [{ name: 'A', durationHours: 3 }] }, 'steps.0.distanceKm'],
    ['humidity without temperature', { kind: 'climate', steps: [{ name: 'A', durationHours: 3, humidityPct: 50 }] }, 'steps.0.temperatureC'],
    ['humidity over 100 %', { kind: 'climate', steps: [{ name: 'A', durationHours: 3, temperatureC: 20, humidityPct: 101 }] }, 'steps.0.humidityPct'],
    ['a temperature below -100 degC', { kind: 'climate', steps: [{ name: 'A', durationHours: 3, temperatureC: -101 }] }, 'steps.0.temperatureC'],
    ['two steps of one name', { kind: 'climate', steps: [{ name: 'A', durationHours: 3 }, { name: 'a', durationHours: 3 }] }, 'steps.1.name'],
    ['no steps', { kind: 'climate', steps: [] }, 'steps'],
  ])('when a campaign has %s, then 400 naming %s', async (_label, fields, field) => {
    const asset = await createAsset(t, world);
    const res = await request(t.app).post(`/api/assets/${asset.id}/campaigns`).set(world.auth('engineer')).send({ name: 'Bad', ...fields });
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.error.details.fields)).toContain(field);
  });

  it('when hours are recorded, then progress, the running step and the clock follow; a step of another campaign answers 400 naming stepId', async () => {
    const asset = await createAsset(t, world);
    const c = await startCampaign(t, world, asset.id);
    const res = await request(t.app).post(`/api/campaigns/${c.id}/progress`).set(world.auth('technician')).send({ stepId: c.steps[0].id, doneHours: 12, version: c.version });
    expect(res.status).toBe(200);
    const after = res.body as Campaign;
    expect(after.progress).toMatchObject({ done: 12, planned: 70 });
    expect(after.currentStep).toMatchObject({ id: c.steps[1].id });
    expect(after.startedAt).not.toBeNull();
    expect(after.version).toBe(c.version + 1);
    const other = await startCampaign(t, world, asset.id, { name: 'Second run' });
    const wrong = await request(t.app).post(`/api/campaigns/${c.id}/progress`).set(world.auth('technician')).send({ stepId: other.steps[0].id, doneHours: 1 });
    expect(wrong.status).toBe(400);
    expect(Object.keys(wrong.body.error.details.fields)).toEqual(['stepId']);
    const none = await request(t.app).post(`/api/campaigns/${c.id}/progress`).set(world.auth('technician')).send({ stepId: c.steps[0].id });
    expect(none.status).toBe(400);
    const stale = await request(t.app).post(`/api/campaigns/${c.id}/progress`).set(world.auth('technician')).send({ stepId: c.steps[0].id, doneHours: 3, version: c.version });
    expect(stale.status).toBe(409);
  });

  it('when a run log is imported as CSV, then every row adds to its step (header, quotes and blank lines allowed)', async () => {
    const asset = await createAsset(t, world);
    const c = await startCampaign(t, world, asset.id);
    const csv = ['step,hours,km', 'Cold soak -20 °C,6,', '"Cold soak -20 °C",6', '', 'ramp to 40 °c,2,0', '"Damp heat 40 °C 85 %RH",10.5,0', 'Damp heat 40 °C 85 %RH,0.25'].join('\r\n');
    const res = await request(t.app).post(`/api/campaigns/${c.id}/log`).set(world.auth('technician')).send({ csv });
    expect(res.status).toBe(200);
    expect(stepDone(res.body)).toEqual([
      ['Cold soak -20 °C', 12, 0],
      ['Ramp to 40 °C', 2, 0],
      ['Damp heat 40 °C 85 %RH', 10.75, 0],
      ['Cold step -10 °C', 0, 0],
    ]);
    expect(res.body.currentStep.name).toBe('Damp heat 40 °C 85 %RH');
    const text = await request(t.app).post(`/api/campaigns/${c.id}/log`).set(world.auth('engineer')).set('Content-Type', 'text/csv').send('Cold step -10 °C,1.5\n');
    expect(text.status).toBe(200);
    expect(text.body.steps[3].doneHours).toBe(1.5);
  });

  it('when a log has bad rows, then 400 lists each bad line and nothing at all is recorded', async () => {
    const asset = await createAsset(t, world);
    const c = await startCampaign(t, world, asset.id);
    const csv = [
      'step,hours,km', // 1: header
      'Cold soak -20 °C,4,0', // 2: good
      'Cold soak,4,0', // 3: no such step
      'Ramp to 40 °C,two,0', // 4: not a number
      '', // 5: blank
      'Damp heat 40 °C 85 %RH,-3', // 6: negative
      'Damp heat 40 °C 85 %RH,1,2,3', // 7: too many columns
      'Cold step -10 °C,,', // 8: nothing run
      'Cold step -10 °C,2', // 9: good
    ].join('\n');
    const res = await request(t.app).post(`/api/campaigns/${c.id}/log`).set(world.auth('technician')).send({ csv });
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('campaign/log-invalid');
    expect(res.body.error.details.lines.map((l: { line: number }) => l.line)).toEqual([3, 4, 6, 7, 8]);
    expect(res.body.error.details.lines[0].message).toContain('No step named "Cold soak"');
    expect(res.body.error.message).toMatch(/^csv: line 3: .*Nothing was recorded\.$/);
    expect(Object.keys(res.body.error.details.fields)).toEqual(['csv']);
    const now = (await request(t.app).get(`/api/campaigns/${c.id}`).set(world.auth('lead'))).body as Campaign;
    expect(stepDone(now)).toEqual(stepDone(c));
    expect(now.version).toBe(c.version);
    expect(now.startedAt).toBeNull();
  });

  it('when the plan changes, then kept steps keep their hours, names may swap, removed steps go, and a stale version answers 409', async () => {
    const asset = await createAsset(t, world);
    const c = await startCampaign(t, world, asset.id);
    const logged = (await request(t.app).post(`/api/campaigns/${c.id}/log`).set(world.auth('technician')).send({ csv: 'Cold soak -20 °C,5\nRamp to 40 °C,1' })).body as Campaign;
    const [soak, ramp, damp] = logged.steps;
    const res = await request(t.app)
      .patch(`/api/campaigns/${c.id}`)
      .set(world.auth('lead'))
      .send({
        name: 'Renamed run',
        version: logged.version,
        steps: [
          { id: ramp.id, name: soak.name, durationHours: 2, temperatureC: 40 },
          { id: soak.id, name: ramp.name, durationHours: 12, temperatureC: -20 },
          { id: damp.id, name: damp.name, durationHours: 24, temperatureC: 40, humidityPct: 85 },
          { name: 'Recovery 23 °C 50 %RH', durationHours: 4, temperatureC: 23, humidityPct: 50 },
        ],
      });
    expect(res.status).toBe(200);
    const after = res.body as Campaign;
    expect(after.name).toBe('Renamed run');
    expect(after.steps.map((s) => [s.id, s.name, s.doneHours])).toEqual([
      [ramp.id, soak.name, 1],
      [soak.id, ramp.name, 5],
      [damp.id, damp.name, 0],
      [expect.any(String), 'Recovery 23 °C 50 %RH', 0],
    ]);
    expect(after.progress.planned).toBe(42);
    const stale = await request(t.app).patch(`/api/campaigns/${c.id}`).set(world.auth('lead')).send({ name: 'Late', version: logged.version });
    expect(stale.status).toBe(409);
    const foreignStep = await request(t.app)
      .patch(`/api/campaigns/${c.id}`)
      .set(world.auth('lead'))
      .send({ version: after.version, steps: [{ id: '00000000-0000-4000-8000-000000000000', name: 'X', durationHours: 1 }] });
    expect(foreignStep.status).toBe(400);
    expect(Object.keys(foreignStep.body.error.details.fields)).toEqual(['steps.0.id']);
    const [history] = (await t.sequelize.query(`SELECT action FROM history_entries WHERE entity_type = 'campaign' AND entity_id = $1 ORDER BY id`, { bind: [c.id] })) as [Array<{ action: string }>, unknown];
    expect(history.map((h) => h.action)).toEqual(['created', 'log-imported', 'updated']);
  });

  it('when the plan view lists the program, then campaigns of its assets show; a stage filter narrows them to the assets on it', async () => {
    const w = await makeWorld(t);
    const a = await createAsset(t, w);
    const b = await createAsset(t, w, { stageId: w.stages[1].id });
    const ca = await startCampaign(t, w, a.id);
    const cb = await startCampaign(t, w, b.id, { kind: 'durability', steps: [{ name: 'Loop', distanceKm: 500 }] });
    const all = await request(t.app).get(`/api/validation/campaigns?programId=${w.program.id}`).set(w.auth('coordinator'));
    expect(all.body.campaigns.map((c: Campaign) => c.id).sort()).toEqual([ca.id, cb.id].sort());
    const onStage = await request(t.app).get(`/api/validation/campaigns?programId=${w.program.id}&stageId=${w.stages[1].id}`).set(w.auth('coordinator'));
    expect(onStage.body.campaigns.map((c: Campaign) => c.id)).toEqual([cb.id]);
    expect(onStage.body.campaigns[0].progress.unit).toBe('km');
  });

  it("when a lead reaches another program's campaigns or assets, then 404 (before any check of the body) and nothing changes", async () => {
    const other = await makeWorld(t);
    const asset = await createAsset(t, other);
    const c = await startCampaign(t, other, asset.id);
    const calls = [
      request(t.app).get(`/api/assets/${asset.id}/campaigns`),
      request(t.app).post(`/api/assets/${asset.id}/campaigns`).send({}),
      request(t.app).post(`/api/assets/${asset.id}/campaigns`).send({ name: 'Mine', kind: 'climate', steps: [{ name: 'A', durationHours: 1 }] }),
      request(t.app).get(`/api/campaigns/${c.id}`),
      request(t.app).patch(`/api/campaigns/${c.id}`).send({ name: 'Taken', version: c.version }),
      request(t.app).post(`/api/campaigns/${c.id}/progress`).send({ stepId: c.steps[0].id, doneHours: 5 }),
      request(t.app).post(`/api/campaigns/${c.id}/log`).send({ csv: 'Cold soak -20 °C,5' }),
      request(t.app).get(`/api/validation/campaigns?programId=${other.program.id}`),
    ];
    for (const [i, call] of calls.entries()) {
      const res = await call.set(world.auth('lead'));
      expect({ call: i, status: res.status }).toEqual({ call: i, status: 404 });
    }
    const now = (await request(t.app).get(`/api/campaigns/${c.id}`).set(other.auth('lead'))).body as Campaign;
    expect(now).toMatchObject({ name: c.name, version: c.version });
    expect(stepDone(now)).toEqual(stepDone(c));
  });
});
