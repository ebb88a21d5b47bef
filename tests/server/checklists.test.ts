import request from 'supertest';
import { SYSTEMS, type Checklist, type ChecklistItem } from '../../shared/schemas/assets';
import { BENCH_TEMPLATE, CAR_TEMPLATE, createAsset, makeWorld, type World } from '../helpers/assets';
import { makeTestApp } from '../helpers/test-app';

const t = makeTestApp();
afterAll(() => t.close());

const checklistOf = async (world: World, assetId: string, query = '') =>
  (await request(t.app).get(`/api/assets/${assetId}/checklist${query}`).set(world.auth('technician'))).body as Checklist;
const itemsOf = (c: Checklist) => c.groups.flatMap((g) => g.items);
const itemTitled = (c: Checklist, title: string) => itemsOf(c).find((i) => i.title === title)!;

describe('checklist instantiation', () => {
  it('when an asset is created, then its stage\'s template becomes its checklist, grouped by system in SYSTEMS order', async () => {
    const world = await makeWorld(t);
    const asset = await createAsset(t, world, {}, 'technician');
    const checklist = await checklistOf(world, asset.id);
    expect(checklist).toMatchObject({ assetId: asset.id, stageId: world.stages[0].id, stage: 'Bench', current: true });
    expect(checklist.groups.map((g) => g.system)).toEqual(SYSTEMS.filter((s) => BENCH_TEMPLATE.some((i) => i.system === s)));
    expect(itemsOf(checklist)).toHaveLength(BENCH_TEMPLATE.length);
    expect(checklist.progress).toEqual({ total: 5, done: 0, requiredTotal: 4, requiredDone: 0, deviations: 0 });
    expect(itemTitled(checklist, 'HV interlock loop check')).toMatchObject({ hvQualified: true, state: 'open', expectedRevision: 'A', updatedBy: null });
    expect(asset.checklist).toEqual(checklist.progress);
  });

  it('when an engineer moves an asset to the next stage, then the new checklist is instantiated and the old one stays readable in the stage history', async () => {
    const world = await makeWorld(t);
    const asset = await createAsset(t, world);
    const bench = await checklistOf(world, asset.id);
    const passed = itemTitled(bench, 'ECU flash confirm');
    await request(t.app).patch(`/api/checklist-items/${passed.id}`).set(world.auth('technician')).send({ state: 'passed', version: passed.version });

    const move = await request(t.app).post(`/api/assets/${asset.id}/stage`).set(world.auth('engineer')).send({ stageId: world.stages[1].id, version: asset.version });
    expect(move.status).toBe(200);
    expect(move.body).toMatchObject({ stageId: world.stages[1].id, stage: 'Integration car', version: asset.version + 1 });
    expect(move.body.stageHistory.map((v: { stage: string; leftAt: string | null }) => [v.stage, v.leftAt === null])).toEqual([
      ['Integration car', true],
      ['Bench', false],
    ]);
    expect(move.body.stageHistory[1].checklist).toMatchObject({ total: 5, done: 1 });

    const car = await checklistOf(world, asset.id);
    expect(itemsOf(car).map((i) => i.title).sort()).toEqual(CAR_TEMPLATE.map((i) => i.title).sort());
    const old = await checklistOf(world, asset.id, `?visitId=${move.body.stageHistory[1].id}`);
    expect(old).toMatchObject({ stage: 'Bench', current: false });
    expect(itemTitled(old, 'ECU flash confirm').state).toBe('passed');

    const closed = itemTitled(old, 'Emergency stop labelled');
    const edit = await request(t.app).patch(`/api/checklist-items/${closed.id}`).set(world.auth('technician')).send({ state: 'passed', version: closed.version });
    expect(edit.status).toBe(409);
    expect(edit.body.error.code).toBe('checklist/closed');

    const [history] = (await t.sequelize.query(`SELECT action, before, after FROM history_entries WHERE entity_id = $1 AND action = 'stage-moved'`, {
      bind: [asset.id],
    })) as [Array<{ before: { stage: string }; after: { stage: string; checklistItems: number } }>, unknown];
    expect(history[0]).toMatchObject({ before: { stage: 'Bench' }, after: { stage: 'Integration car', checklistItems: 3 } });
  });

  it.each(['technician', 'coordinator', 'driver'] as const)('when a %s tries to move an asset between stages, then 403 and nothing moves', async (role) => {
    const world = await makeWorld(t);
    const asset = await createAsset(t, world);
    const res = await request(t.app).post(`/api/assets/${asset.id}/stage`).set(world.auth(role)).send({ stageId: world.stages[1].id, version: asset.version });
    expect(res.status).toBe(403);
    expect((await checklistOf(world, asset.id)).stage).toBe('Bench');
  });

  it('when a stage move carries a stale version, then 409 with the current asset and no new checklist', async () => {
    const world = await makeWorld(t);
    const asset = await createAsset(t, world);
    await request(t.app).patch(`/api/assets/${asset.id}`).set(world.auth('lead')).send({ location: 'Bay 4', version: asset.version });
    const res = await request(t.app).post(`/api/assets/${asset.id}/stage`).set(world.auth('lead')).send({ stageId: world.stages[1].id, version: asset.version });
    expect(res.status).toBe(409);
    expect(res.body.error.details.current).toMatchObject({ id: asset.id, location: 'Bay 4', stage: 'Bench' });
    const [rows] = (await t.sequelize.query(`SELECT count(*)::int AS n FROM stage_visits WHERE asset_id = $1`, { bind: [asset.id] })) as [Array<{ n: number }>, unknown];
    expect(rows[0].n).toBe(1);
  });
});

describe('working checklist items', () => {
  it.each([
    ['technician', 200],
    ['engineer', 200],
    ['lead', 200],
    ['coordinator', 403],
    ['driver', 403],
  ] as const)('when a %s marks an item passed, then %i', async (role, status) => {
    const world = await makeWorld(t);
    const asset = await createAsset(t, world);
    const item = itemsOf(await checklistOf(world, asset.id))[0];
    const res = await request(t.app)
      .patch(`/api/checklist-items/${item.id}`)
      .set(world.auth(role))
      .send({ state: 'passed', fittedPartNumber: ' FW3-41220-C ', fittedRevision: '04', version: item.version });
    expect(res.status).toBe(status);
    if (status === 200) {
      expect(res.body).toMatchObject({ state: 'passed', fittedPartNumber: 'FW3-41220-C', fittedRevision: '04', updatedBy: world.users[role].name, version: item.version + 1 });
      expect(Date.parse(res.body.updatedAt)).toBeGreaterThan(Date.now() - 60_000);
      const [rows] = (await t.sequelize.query(`SELECT actor_id, before, after FROM history_entries WHERE entity_id = $1`, { bind: [item.id] })) as [
        Array<{ actor_id: string; before: { state: string }; after: { state: string; fittedPartNumber: string } }>,
        unknown,
      ];
      expect(rows).toEqual([expect.objectContaining({ actor_id: world.users[role].id, before: expect.objectContaining({ state: 'open' }), after: expect.objectContaining({ state: 'passed', fittedPartNumber: 'FW3-41220-C' }) })]);
    }
  });

  it('when an item is marked not applicable without a reason, then 400 naming naReason; with one, then it counts as done', async () => {
    const world = await makeWorld(t);
    const asset = await createAsset(t, world);
    const item = itemTitled(await checklistOf(world, asset.id), 'Emergency stop labelled');
    const bare = await request(t.app).patch(`/api/checklist-items/${item.id}`).set(world.auth('technician')).send({ state: 'not-applicable', naReason: '   ', version: item.version });
    expect(bare.status).toBe(400);
    expect(Object.keys(bare.body.error.details.fields)).toEqual(['naReason']);
    const ok = await request(t.app)
      .patch(`/api/checklist-items/${item.id}`)
      .set(world.auth('technician'))
      .send({ state: 'not-applicable', naReason: 'Rig has no HV contactors.', version: item.version });
    expect(ok.status).toBe(200);
    expect(ok.body.naReason).toBe('Rig has no HV contactors.');
    expect((await checklistOf(world, asset.id)).progress).toMatchObject({ done: 1, requiredDone: 1 });
  });

  it('when an item is marked a deviation without a description, then 400 naming deviation.description and nothing is saved', async () => {
    const world = await makeWorld(t);
    const asset = await createAsset(t, world);
    const item = itemsOf(await checklistOf(world, asset.id))[0];
    const res = await request(t.app).patch(`/api/checklist-items/${item.id}`).set(world.auth('technician')).send({ state: 'deviation', version: item.version });
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.error.details.fields)).toEqual(['deviation.description']);
    const [rows] = (await t.sequelize.query(`SELECT count(*)::int AS n FROM findings WHERE checklist_item_id = $1`, { bind: [item.id] })) as [Array<{ n: number }>, unknown];
    expect(rows[0].n).toBe(0);
  });

  it('when an item is marked a deviation, then a major open finding linked to the item is created and counted', async () => {
    const world = await makeWorld(t);
    const asset = await createAsset(t, world);
    const item = itemTitled(await checklistOf(world, asset.id), 'Isolation resistance measurement');
    const res = await request(t.app)
      .patch(`/api/checklist-items/${item.id}`)
      .set(world.auth('technician'))
      .send({ state: 'deviation', notes: 'HV- 0.4 MOhm', deviation: { description: 'Isolation low on HV- after rain test.' }, version: item.version });
    expect(res.status).toBe(200);
    expect(res.body.findingId).toEqual(expect.any(String));
    const [findings] = (await t.sequelize.query(`SELECT * FROM findings WHERE id = $1`, { bind: [res.body.findingId] })) as [Array<Record<string, unknown>>, unknown];
    expect(findings[0]).toMatchObject({
      program_id: world.program.id,
      asset_id: asset.id,
      checklist_item_id: item.id,
      title: 'Deviation: Isolation resistance measurement',
      description: 'Isolation low on HV- after rain test.',
      system: 'high-voltage',
      severity: 'major',
      status: 'open',
      created_by: world.users.technician.id,
      version: 0,
    });
    const checklist = await checklistOf(world, asset.id);
    expect(checklist.progress).toMatchObject({ deviations: 1, done: 0 });
    expect(checklist.groups.find((g) => g.system === 'high-voltage')!.progress.deviations).toBe(1);
    const detail = await request(t.app).get(`/api/assets/${asset.id}`).set(world.auth('driver'));
    expect(detail.body).toMatchObject({ cleared: true, notClearedReason: null });
    const history = await request(t.app).get(`/api/assets/${asset.id}/history`).set(world.auth('driver'));
    expect(history.body.entries.slice(0, 2).map((e: { entityType: string }) => e.entityType).sort()).toEqual(['checklist-item', 'finding']);
  });

  it('when a deviation of severity safety is open, then the asset is not cleared and says why; once verified, it is cleared', async () => {
    const world = await makeWorld(t);
    const asset = await createAsset(t, world);
    const item = itemTitled(await checklistOf(world, asset.id), 'HV interlock loop check');
    const res = await request(t.app)
      .patch(`/api/checklist-items/${item.id}`)
      .set(world.auth('engineer'))
      .send({
        state: 'deviation',
        deviation: { title: 'HVIL open at rear junction box', description: 'Loop reads open with every connector closed.', severity: 'safety' },
        version: item.version,
      });
    expect(res.status).toBe(200);
    const detail = await request(t.app).get(`/api/assets/${asset.id}`).set(world.auth('driver'));
    expect(detail.body).toMatchObject({ cleared: false, notClearedReason: 'HVIL open at rear junction box' });
    const list = await request(t.app).get(`/api/assets?programId=${world.program.id}&q=${asset.tag}`).set(world.auth('driver'));
    expect(list.body.items[0]).toMatchObject({ cleared: false, notClearedReason: 'HVIL open at rear junction box' });
    await t.sequelize.query(`UPDATE findings SET status = 'verified' WHERE id = $1`, { bind: [res.body.findingId] });
    const after = await request(t.app).get(`/api/assets/${asset.id}`).set(world.auth('driver'));
    expect(after.body).toMatchObject({ cleared: true, notClearedReason: null });
  });

  it('when an item is saved with a stale version, then 409 with the current item', async () => {
    const world = await makeWorld(t);
    const asset = await createAsset(t, world);
    const item = itemsOf(await checklistOf(world, asset.id))[0];
    await request(t.app).patch(`/api/checklist-items/${item.id}`).set(world.auth('technician')).send({ state: 'passed', version: item.version });
    const stale = await request(t.app).patch(`/api/checklist-items/${item.id}`).set(world.auth('engineer')).send({ state: 'open', version: item.version });
    expect(stale.status).toBe(409);
    expect(stale.body.error).toMatchObject({ code: 'request/conflict', details: { current: { id: item.id, state: 'passed', version: item.version + 1 } } });
  });

  it.each([
    { label: 'an unknown state', body: { state: 'done' }, field: 'state' },
    { label: 'an over-long note', body: { state: 'passed', notes: 'x'.repeat(2001) }, field: 'notes' },
    { label: 'a missing version', body: { state: 'passed' }, field: 'version' },
    { label: 'an unknown field', body: { state: 'passed', version: 0, approvedBy: 'me' }, field: 'approvedBy' },
  ])('when an item update has $label, then 400 naming $field', async ({ body, field }) => {
    const world = await makeWorld(t);
    const asset = await createAsset(t, world);
    const item: ChecklistItem = itemsOf(await checklistOf(world, asset.id))[0];
    const res = await request(t.app).patch(`/api/checklist-items/${item.id}`).set(world.auth('technician')).send(body);
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.error.details.fields)).toContain(field);
  });
});
