import request from 'supertest';
import { DEFAULT_GATE, DEFAULT_STAGE_DRIVER_LEVELS, DEFAULT_STAGES, type Stage } from '../../shared/schemas/assets';
import { createAsset, makeWorld, WORKING_ROLES, type World } from '../helpers/assets';
import { makeTestApp, makeUser, signInAs, uid } from '../helpers/test-app';

const t = makeTestApp();
afterAll(() => t.close());

const listStages = async (world: World) =>
  (await request(t.app).get(`/api/stages?programId=${world.program.id}`).set(world.auth('technician'))).body.stages as Stage[];

describe('default stages', () => {
  it('when an admin creates a program, then it has the four default stages with the default gate and driver levels', async () => {
    const admin = await makeUser({ role: 'admin' });
    const token = await signInAs(t.app, admin.email);
    const created = await request(t.app)
      .post('/api/admin/programs')
      .set('Authorization', `Bearer ${token}`)
      .send({ code: `P${uid().slice(0, 6)}`, name: 'New program' });
    expect(created.status).toBe(201);
    const fresh = await signInAs(t.app, admin.email);
    const res = await request(t.app).get(`/api/stages?programId=${created.body.id}`).set('Authorization', `Bearer ${fresh}`);
    expect(res.status).toBe(200);
    expect(res.body.stages.map((s: Stage) => [s.name, s.position, s.minDriverLevel, s.retired])).toEqual(
      DEFAULT_STAGES.map((name, i) => [name, i, DEFAULT_STAGE_DRIVER_LEVELS[i], false]),
    );
    expect(res.body.stages[0].gate).toEqual(DEFAULT_GATE);
  });
});

describe('who may change stages', () => {
  it.each(WORKING_ROLES.filter((r) => r !== 'lead'))('when a %s adds, renames, reorders, retires or deletes a stage, then 403', async (role) => {
    const world = await makeWorld(t);
    const stage = world.stages[3];
    const calls = [
      request(t.app).post('/api/stages').set(world.auth(role)).send({ programId: world.program.id, name: 'Pilot build' }),
      request(t.app).patch(`/api/stages/${stage.id}`).set(world.auth(role)).send({ name: 'Renamed', version: stage.version }),
      request(t.app).patch(`/api/stages/${stage.id}`).set(world.auth(role)).send({ retired: true, version: stage.version }),
      request(t.app)
        .post('/api/stages/reorder')
        .set(world.auth(role))
        .send({ programId: world.program.id, stageIds: [...world.stages].reverse().map((s) => s.id) }),
      request(t.app).delete(`/api/stages/${stage.id}`).set(world.auth(role)),
    ];
    for (const res of await Promise.all(calls)) expect(res.status).toBe(403);
    expect((await listStages(world)).map((s) => s.name)).toEqual([...DEFAULT_STAGES]);
  });

  it('when a lead adds a stage, then it comes last with the default gate, and the history has it', async () => {
    const world = await makeWorld(t);
    const res = await request(t.app).post('/api/stages').set(world.auth('lead')).send({ programId: world.program.id, name: '  Pilot build  ' });
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({ name: 'Pilot build', position: 4, retired: false, gate: DEFAULT_GATE, assetCount: 0 });
    const [rows] = (await t.sequelize.query(`SELECT action FROM history_entries WHERE entity_id = $1`, { bind: [res.body.id] })) as [Array<{ action: string }>, unknown];
    expect(rows.map((r) => r.action)).toEqual(['created']);
  });

  it('when a lead renames a stage with the current version, then it is saved; with a stale version, then 409 with the current stage', async () => {
    const world = await makeWorld(t);
    const stage = world.stages[1];
    const ok = await request(t.app).patch(`/api/stages/${stage.id}`).set(world.auth('lead')).send({ name: 'Mule car', version: stage.version });
    expect(ok.status).toBe(200);
    expect(ok.body).toMatchObject({ name: 'Mule car', version: stage.version + 1 });
    const stale = await request(t.app).patch(`/api/stages/${stage.id}`).set(world.auth('lead')).send({ name: 'Other', version: stage.version });
    expect(stale.status).toBe(409);
    expect(stale.body.error.code).toBe('request/conflict');
    expect(stale.body.error.details.current).toMatchObject({ id: stage.id, name: 'Mule car', version: stage.version + 1 });
  });

  it('when a lead gives a stage the name of another stage of the program, then 409 naming `name`', async () => {
    const world = await makeWorld(t);
    const res = await request(t.app)
      .patch(`/api/stages/${world.stages[1].id}`)
      .set(world.auth('lead'))
      .send({ name: 'bench', version: world.stages[1].version });
    expect(res.status).toBe(409);
    expect(Object.keys(res.body.error.details.fields)).toEqual(['name']);
  });

  it('when a lead reorders the stages, then the positions follow; a list that misses a stage is refused naming stageIds', async () => {
    const world = await makeWorld(t);
    const order = [world.stages[2], world.stages[0], world.stages[3], world.stages[1]].map((s) => s.id);
    const res = await request(t.app).post('/api/stages/reorder').set(world.auth('lead')).send({ programId: world.program.id, stageIds: order });
    expect(res.status).toBe(200);
    expect(res.body.stages.map((s: Stage) => s.id)).toEqual(order);
    expect(res.body.stages.map((s: Stage) => s.position)).toEqual([0, 1, 2, 3]);
    const partial = await request(t.app)
      .post('/api/stages/reorder')
      .set(world.auth('lead'))
      .send({ programId: world.program.id, stageIds: order.slice(1) });
    expect(partial.status).toBe(400);
    expect(Object.keys(partial.body.error.details.fields)).toEqual(['stageIds']);
  });

  it('when the gate weights do not add up to 1, then 400 naming gate.weights', async () => {
    const world = await makeWorld(t);
    const res = await request(t.app)
      .patch(`/api/stages/${world.stages[0].id}`)
      .set(world.auth('lead'))
      .send({ gate: { ...DEFAULT_GATE, weights: { ...DEFAULT_GATE.weights, checklist: 0.9 } }, version: 0 });
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.error.details.fields)).toEqual(['gate.weights']);
  });

  it('when a lead changes the gate settings and driver level, then they are saved', async () => {
    const world = await makeWorld(t);
    const gate = { ...DEFAULT_GATE, goThreshold: 85, conditionalThreshold: 70, findingsBudget: 30 };
    const res = await request(t.app).patch(`/api/stages/${world.stages[2].id}`).set(world.auth('lead')).send({ gate, minDriverLevel: 3, version: 0 });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ gate, minDriverLevel: 3 });
  });
});

describe('retiring and deleting stages', () => {
  it('when a stage is retired, then assets can be neither created on it nor moved to it (400 naming stageId)', async () => {
    const world = await makeWorld(t);
    const retired = await request(t.app).patch(`/api/stages/${world.stages[3].id}`).set(world.auth('lead')).send({ retired: true, version: 0 });
    expect(retired.body.retired).toBe(true);
    const create = await request(t.app)
      .post('/api/assets')
      .set(world.auth('lead'))
      .send({ programId: world.program.id, tag: `R-${uid()}`, kind: 'vehicle', stageId: world.stages[3].id });
    expect(create.status).toBe(400);
    expect(create.body.error.details.fields).toHaveProperty('stageId');
    const asset = await createAsset(t, world);
    const move = await request(t.app).post(`/api/assets/${asset.id}/stage`).set(world.auth('lead')).send({ stageId: world.stages[3].id, version: asset.version });
    expect(move.status).toBe(400);
    expect(move.body.error.code).toBe('stage/retired');
  });

  it('when a stage has no assets and no history, then a lead deletes it and the others close up', async () => {
    const world = await makeWorld(t);
    const res = await request(t.app).delete(`/api/stages/${world.stages[1].id}`).set(world.auth('lead'));
    expect(res.status).toBe(204);
    const stages = await listStages(world);
    expect(stages.map((s) => [s.name, s.position])).toEqual([
      ['Bench', 0],
      ['Early prototype', 1],
      ['Validation build', 2],
    ]);
  });

  it.each([
    ['an asset is on it', false],
    ['an asset passed through it', true],
  ])('when %s, then deleting the stage answers 409 with a plain message and the stage stays', async (_label, moveAway) => {
    const world = await makeWorld(t);
    const asset = await createAsset(t, world);
    if (moveAway) {
      const moved = await request(t.app).post(`/api/assets/${asset.id}/stage`).set(world.auth('lead')).send({ stageId: world.stages[1].id, version: asset.version });
      expect(moved.status).toBe(200);
    }
    const res = await request(t.app).delete(`/api/stages/${world.stages[0].id}`).set(world.auth('lead'));
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('stage/in-use');
    expect(res.body.error.message).toMatch(/cannot be deleted.*Retire it instead/);
    expect((await listStages(world)).map((s) => s.name)).toContain('Bench');
  });
});

describe('checklist templates', () => {
  it.each([
    ['engineer', 201],
    ['lead', 201],
    ['technician', 403],
    ['coordinator', 403],
    ['driver', 403],
  ] as const)('when a %s adds a template item, then %i', async (role, status) => {
    const world = await makeWorld(t);
    const res = await request(t.app)
      .post(`/api/stages/${world.stages[2].id}/template/items`)
      .set(world.auth(role))
      .send({ system: 'thermal', title: 'Refrigerant charge', expectedPartNumber: 'FW3-36000-A', expectedRevision: '02' });
    expect(res.status).toBe(status);
    if (status === 201) expect(res.body).toMatchObject({ system: 'thermal', title: 'Refrigerant charge', requiredForGate: true, hvQualified: false, position: 0, version: 0 });
  });

  it('when a template item is changed, then checklists created afterwards copy the change and existing ones keep theirs', async () => {
    const world = await makeWorld(t);
    const before = await createAsset(t, world);
    const template = await request(t.app).get(`/api/stages/${world.stages[0].id}/template`).set(world.auth('driver'));
    expect(template.status).toBe(200);
    const first = template.body.items[0];
    const patch = await request(t.app)
      .patch(`/api/template-items/${first.id}`)
      .set(world.auth('engineer'))
      .send({ title: 'ECU flash confirm (all ECUs)', expectedRevision: 'B', version: first.version });
    expect(patch.status).toBe(200);
    expect(patch.body).toMatchObject({ title: 'ECU flash confirm (all ECUs)', expectedRevision: 'B', version: first.version + 1 });
    const added = await request(t.app).post(`/api/stages/${world.stages[0].id}/template/items`).set(world.auth('lead')).send({ system: 'safety', title: 'Fire extinguisher present' });
    expect(added.status).toBe(201);
    const retired = template.body.items[4];
    await request(t.app).patch(`/api/template-items/${retired.id}`).set(world.auth('lead')).send({ retired: true, version: retired.version });

    const after = await createAsset(t, world);
    const titles = async (assetId: string) => {
      const res = await request(t.app).get(`/api/assets/${assetId}/checklist`).set(world.auth('technician'));
      return res.body.groups.flatMap((g: { items: Array<{ title: string; expectedRevision: string }> }) => g.items.map((i) => `${i.title}/${i.expectedRevision}`));
    };
    expect(await titles(before.id)).toContain('ECU flash confirm/A');
    expect(await titles(before.id)).toContain('Rig enclosure closed/A');
    const fresh = await titles(after.id);
    expect(fresh).toContain('ECU flash confirm (all ECUs)/B');
    expect(fresh).toContain('Fire extinguisher present/');
    expect(fresh).not.toContain('Rig enclosure closed/A');
  });

  it('when a template item is moved to position 0, then the others follow it', async () => {
    const world = await makeWorld(t);
    const { body } = await request(t.app).get(`/api/stages/${world.stages[0].id}/template`).set(world.auth('lead'));
    const last = body.items[body.items.length - 1];
    const res = await request(t.app).patch(`/api/template-items/${last.id}`).set(world.auth('lead')).send({ position: 0, version: last.version });
    expect(res.status).toBe(200);
    const again = await request(t.app).get(`/api/stages/${world.stages[0].id}/template`).set(world.auth('lead'));
    expect(again.body.items.map((i: { id: string }) => i.id)).toEqual([last.id, ...body.items.slice(0, -1).map((i: { id: string }) => i.id)]);
    expect(again.body.items.map((i: { position: number }) => i.position)).toEqual([0, 1, 2, 3, 4]);
  });

  it('when a template item is changed with a stale version, then 409 with the current item', async () => {
    const world = await makeWorld(t);
    const { body } = await request(t.app).get(`/api/stages/${world.stages[0].id}/template`).set(world.auth('lead'));
    const item = body.items[0];
    await request(t.app).patch(`/api/template-items/${item.id}`).set(world.auth('lead')).send({ title: 'First', version: item.version });
    const stale = await request(t.app).patch(`/api/template-items/${item.id}`).set(world.auth('lead')).send({ title: 'Second', version: item.version });
    expect(stale.status).toBe(409);
    expect(stale.body.error.details.current).toMatchObject({ id: item.id, title: 'First' });
  });
});
