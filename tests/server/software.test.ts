import request from 'supertest';
import semver from 'semver';
import {
  AssetSoftwareSchema,
  BaselineDiffSchema,
  BaselineListSchema,
  BaselineSchema,
  EcuListSchema,
  EcuSchema,
  VersionCompareSchema,
} from '../../shared/schemas/software';
import { createAsset } from '../helpers/assets';
import { EXAMPLE_RULE, flash, makeBaseline, makeSoftwareWorld, softwareAsset, type SoftwareWorld } from '../helpers/software';
import { makeTestApp } from '../helpers/test-app';

const t = makeTestApp();
afterAll(() => t.close());

describe('GET /api/calc/version-compare', () => {
  let world: SoftwareWorld;
  beforeAll(async () => {
    world = await makeSoftwareWorld(t);
  });
  const calc = (query: Record<string, string>, role: 'driver' | 'coordinator' = 'driver') =>
    request(t.app).get('/api/calc/version-compare').query(query).set(world.auth(role));

  it.each([
    // semver.org section 11, the example chain; the semver package as the reference.
    ['1.0.0-alpha', '1.0.0-alpha.1', undefined, { status: 'behind', order: -1, satisfiesRange: null }],
    ['1.0.0-beta.11', '1.0.0-beta.2', undefined, { status: 'ahead', order: 1, satisfiesRange: null }],
    ['1.0.0+a', '1.0.0+b', undefined, { status: 'on-baseline', order: 0, satisfiesRange: null }],
    // PRODUCT.md section 3D example range.
    ['3.0.4', '3.2.0', '>=3.1.0 <4', { status: 'behind', order: -1, satisfiesRange: false }],
    ['3.2.0', '3.2.0', '>=3.1.0 <4', { status: 'on-baseline', order: 0, satisfiesRange: true }],
    ['B07_RC2', '3.2.0', '>=3.1.0 <4', { status: 'not-comparable', order: null, satisfiesRange: null }],
    ['B07_RC2', 'B07_RC2', '', { status: 'on-baseline', order: null, satisfiesRange: null }],
  ])('when a driver compares %s with %s (range %s), then the answer is %o', async (installed, target, range, expected) => {
    const res = await calc({ installed, target, ...(range !== undefined ? { range } : {}) });
    expect(res.status).toBe(200);
    expect(VersionCompareSchema.parse(res.body)).toMatchObject(expected);
    if (expected.order !== null) expect(res.body.order).toBe(semver.compare(installed, target));
  });

  it.each([
    ['a range that does not parse', { installed: '1.0.0', target: '1.0.0', range: '>=banana' }, 'range', /does not parse/],
    ['a version over 64 characters', { installed: '1'.repeat(65), target: '1.0.0' }, 'installed', /at most 64/],
    ['no target', { installed: '1.0.0' }, 'target', /required/],
    ['an unknown parameter', { installed: '1.0.0', target: '1.0.0', loose: 'true' }, 'loose', /not accepted/],
  ])('when it gets %s, then 400 naming the field with the reason', async (_label, query, field, reason) => {
    const res = await calc(query as Record<string, string>);
    expect(res.status).toBe(400);
    expect(res.body.error.details.fields[field]).toMatch(reason);
  });

  it('when nobody is signed in, then 401', async () => {
    const res = await request(t.app).get('/api/calc/version-compare?installed=1.0.0&target=1.0.0');
    expect(res.status).toBe(401);
  });
});

describe('ECU catalogue', () => {
  it('when an engineer adds an ECU, then members read it; a duplicate code is 409 naming code; a stale edit is 409', async () => {
    const world = await makeSoftwareWorld(t);
    const list = await request(t.app).get(`/api/ecus?programId=${world.program.id}`).set(world.auth('driver'));
    expect(list.status).toBe(200);
    expect(EcuListSchema.parse(list.body).items.map((e) => e.code)).toEqual(['BCM', 'CAM', 'FZC', 'INV']);
    const dup = await request(t.app).post('/api/ecus').set(world.auth('lead')).send({ programId: world.program.id, code: 'fzc', name: 'Again', assetKinds: ['vehicle'] });
    expect(dup.status).toBe(409);
    expect(Object.keys(dup.body.error.details.fields)).toEqual(['code']);
    const fzc = world.ecus.FZC;
    const edit = await request(t.app).patch(`/api/ecus/${fzc.id}`).set(world.auth('engineer')).send({ supplier: 'Another supplier', stageIds: [world.stages[1].id], version: fzc.version });
    expect(edit.status).toBe(200);
    expect(EcuSchema.parse(edit.body)).toMatchObject({ supplier: 'Another supplier', stageIds: [world.stages[1].id], version: fzc.version + 1 });
    const notes = await request(t.app).patch(`/api/ecus/${fzc.id}`).set(world.auth('lead')).send({ notes: 'Flash with the 12 V charger on.', version: edit.body.version });
    expect(notes.body).toMatchObject({ notes: 'Flash with the 12 V charger on.', supplier: 'Another supplier', stageIds: [world.stages[1].id], assetKinds: ['vehicle', 'bench-rig'] });
    const stale = await request(t.app).patch(`/api/ecus/${fzc.id}`).set(world.auth('engineer')).send({ supplier: 'Stale', version: fzc.version });
    expect(stale.status).toBe(409);
    expect(stale.body.error.details.current.supplier).toBe('Another supplier');
  });

  it.each(['technician', 'coordinator', 'driver', 'admin'] as const)('when a %s adds or edits an ECU, then 403', async (role) => {
    const world = await makeSoftwareWorld(t);
    const add = await request(t.app).post('/api/ecus').set(world.auth(role)).send({ programId: world.program.id, code: 'NEW', name: 'New', assetKinds: ['vehicle'] });
    expect(add.status).toBe(403);
    const edit = await request(t.app).patch(`/api/ecus/${world.ecus.FZC.id}`).set(world.auth(role)).send({ name: 'X', version: 0 });
    expect(edit.status).toBe(403);
  });
});

describe('baselines', () => {
  it('when a draft is created, edited and released, then it is read-only: editing it answers 409 and nothing changes', async () => {
    const world = await makeSoftwareWorld(t);
    const draft = await makeBaseline(t, world, world.ecus, world.stage.id, { FZC: '4.3.0', BCM: '3.2.0' }, false, 'Next release');
    expect(BaselineSchema.parse(draft)).toMatchObject({ status: 'draft', releasedAt: null });
    expect(draft.rules[0]).toMatchObject({ whenEcuCode: 'FZC', thenEcuCode: 'BCM', range: EXAMPLE_RULE.range, whenMinVersion: '4.2.0' });
    const edited = await request(t.app).patch(`/api/baselines/${draft.id}`).set(world.auth('lead')).send({ targets: [{ ecuId: world.ecus.FZC.id, version: '4.3.1' }], version: draft.version });
    expect(edited.status).toBe(200);
    expect(edited.body.targets).toEqual([{ ecuId: world.ecus.FZC.id, ecuCode: 'FZC', ecuName: 'FZC controller', version: '4.3.1' }]);
    const released = await request(t.app).post(`/api/baselines/${draft.id}/release`).set(world.auth('engineer')).send({ version: edited.body.version });
    expect(released.status).toBe(200);
    expect(released.body).toMatchObject({ status: 'released', releasedBy: { id: world.users.engineer.id } });
    const edit = await request(t.app).patch(`/api/baselines/${draft.id}`).set(world.auth('engineer')).send({ name: 'Changed after release', version: released.body.version });
    expect(edit.status).toBe(409);
    expect(edit.body.error.code).toBe('baseline/read-only');
    const again = await request(t.app).post(`/api/baselines/${draft.id}/release`).set(world.auth('engineer')).send({ version: released.body.version });
    expect(again.status).toBe(409);
    const del = await request(t.app).delete(`/api/baselines/${draft.id}`).set(world.auth('engineer'));
    expect(del.status).toBe(409);
    const read = await request(t.app).get(`/api/baselines/${draft.id}`).set(world.auth('driver'));
    expect(read.body).toMatchObject({ name: 'Next release', status: 'released', targets: [{ version: '4.3.1' }] });
  });

  it('when a new baseline of the same stage is released, then the previous one is superseded by it', async () => {
    const world = await makeSoftwareWorld(t);
    const next = await makeBaseline(t, world, world.ecus, world.stage.id, { FZC: '4.3.0' }, true, 'Release 2');
    const old = await request(t.app).get(`/api/baselines/${world.baseline.id}`).set(world.auth('technician'));
    expect(old.body).toMatchObject({ status: 'superseded', supersededById: next.id });
    const list = await request(t.app).get(`/api/baselines?programId=${world.program.id}&stageId=${world.stage.id}`).set(world.auth('driver'));
    expect(BaselineListSchema.parse(list.body).items.map((b) => [b.name, b.status]).sort()).toEqual([
      ['Release 2', 'released'],
      ['Test release', 'superseded'],
    ]);
    const released = await request(t.app).get(`/api/baselines?programId=${world.program.id}&status=released`).set(world.auth('driver'));
    expect(released.body.items.map((b: { id: string }) => b.id)).toEqual([next.id]);
  });

  it('when a baseline has a rule whose range does not parse or an ECU of another program, then 400 with the reason', async () => {
    const world = await makeSoftwareWorld(t);
    const other = await makeSoftwareWorld(t);
    const bad = await request(t.app)
      .post('/api/baselines')
      .set(world.auth('engineer'))
      .send({
        programId: world.program.id,
        stageId: world.stage.id,
        name: 'Bad',
        date: '2026-12-01',
        rules: [{ whenEcuId: world.ecus.FZC.id, whenMinVersion: '4.2.0', thenEcuId: world.ecus.BCM.id, range: '>=3.1.0 <<4' }],
      });
    expect(bad.status).toBe(400);
    expect(bad.body.error.details.fields['rules.0.range']).toMatch(/does not parse/);
    const foreign = await request(t.app)
      .post('/api/baselines')
      .set(world.auth('engineer'))
      .send({ programId: world.program.id, stageId: world.stage.id, name: 'Foreign', date: '2026-12-01', targets: [{ ecuId: other.ecus.FZC.id, version: '1.0.0' }] });
    expect(foreign.status).toBe(400);
    expect(Object.keys(foreign.body.error.details.fields)).toEqual(['targets.0.ecuId']);
  });

  it('when two baselines are compared, then each target says how it moved and each rule whether it changed', async () => {
    const world = await makeSoftwareWorld(t);
    const next = await request(t.app)
      .post('/api/baselines')
      .set(world.auth('engineer'))
      .send({ programId: world.program.id, stageId: world.stage.id, name: 'R2', date: '2026-12-02', copyFromId: world.baseline.id });
    expect(next.status).toBe(201);
    expect(next.body.targets).toHaveLength(4);
    const changed = await request(t.app)
      .patch(`/api/baselines/${next.body.id}`)
      .set(world.auth('engineer'))
      .send({
        targets: [
          { ecuId: world.ecus.FZC.id, version: '4.3.0' },
          { ecuId: world.ecus.BCM.id, version: '3.1.0' },
          { ecuId: world.ecus.CAM.id, version: 'CAM_SW_0430' },
        ],
        rules: [{ whenEcuId: world.ecus.FZC.id, whenMinVersion: '4.2.0', thenEcuId: world.ecus.BCM.id, range: '>=3.2.0 <4' }],
        version: next.body.version,
      });
    expect(changed.status).toBe(200);
    const diff = await request(t.app).get(`/api/baselines/${world.baseline.id}/diff/${next.body.id}`).set(world.auth('driver'));
    expect(diff.status).toBe(200);
    const body = BaselineDiffSchema.parse(diff.body);
    expect(Object.fromEntries(body.targets.map((d) => [d.ecuCode, d.change]))).toEqual({ BCM: 'downgraded', CAM: 'changed', FZC: 'upgraded', INV: 'removed' });
    expect(body.rules.map((r) => r.change)).toEqual(['changed']);
  });

  it.each(['technician', 'coordinator', 'driver'] as const)('when a %s creates, edits or releases a baseline, then 403', async (role) => {
    const world = await makeSoftwareWorld(t);
    const draft = await makeBaseline(t, world, world.ecus, world.stages[2].id, { FZC: '4.2.1' }, false);
    const create = await request(t.app).post('/api/baselines').set(world.auth(role)).send({ programId: world.program.id, stageId: world.stage.id, name: 'X', date: '2026-12-01' });
    const edit = await request(t.app).patch(`/api/baselines/${draft.id}`).set(world.auth(role)).send({ name: 'X', version: draft.version });
    const release = await request(t.app).post(`/api/baselines/${draft.id}/release`).set(world.auth(role)).send({ version: draft.version });
    expect([create.status, edit.status, release.status]).toEqual([403, 403, 403]);
  });
});

describe('installed software of an asset', () => {
  it('when versions are flashed, then the software tab shows installed, target, status, broken rules and every earlier version', async () => {
    const world = await makeSoftwareWorld(t);
    const asset = await softwareAsset(t, world);
    await flash(t, world, asset.id, { FZC: '4.2.1', BCM: '3.2.0', INV: '2.2.0', CAM: 'CAM_SW_0398' });
    await flash(t, world, asset.id, { BCM: '3.0.4' }, 'engineer');
    const res = await request(t.app).get(`/api/assets/${asset.id}/software`).set(world.auth('driver'));
    expect(res.status).toBe(200);
    const body = AssetSoftwareSchema.parse(res.body);
    const byCode = Object.fromEntries(body.ecus.map((e) => [e.ecu.code, e]));
    expect(byCode.FZC).toMatchObject({ target: '4.2.1', status: 'on-baseline' });
    expect(byCode.INV).toMatchObject({ target: '2.3.0', status: 'behind', order: -1 });
    expect(byCode.CAM).toMatchObject({ status: 'not-comparable', order: null, note: expect.stringMatching(/not a semantic version/) });
    expect(byCode.BCM.status).toBe('rule-broken');
    expect(byCode.BCM.rulesBroken[0]).toMatchObject({ whenInstalled: '4.2.1', thenInstalled: '3.0.4', rule: { whenEcuCode: 'FZC', thenEcuCode: 'BCM', range: '>=3.1.0 <4' } });
    expect(byCode.BCM.rulesBroken[0].message).toMatch(/FZC is at 4\.2\.1.*BCM must be within >=3\.1\.0 <4; it is at 3\.0\.4/);
    expect(byCode.BCM.history.map((h) => h.softwareVersion)).toEqual(['3.0.4', '3.2.0']);
    expect(byCode.BCM.installed).toMatchObject({ softwareVersion: '3.0.4', source: 'manual', flashedBy: { id: world.users.engineer.id }, version: 1 });
    expect(body.counts).toMatchObject({ 'on-baseline': 1, behind: 1, 'not-comparable': 1, 'rule-broken': 1 });
    expect(body.score).toEqual({ onBaseline: 1, expected: 4 });
    expect(body.baseline).toMatchObject({ id: world.baseline.id });
    const history = await request(t.app).get(`/api/assets/${asset.id}/history`).set(world.auth('driver'));
    const flashes = history.body.entries.filter((e: { action: string }) => e.action === 'software-flashed');
    expect(flashes).toHaveLength(5);
    expect(flashes[0]).toMatchObject({ before: { ecu: 'BCM', softwareVersion: '3.2.0' }, after: { ecu: 'BCM', softwareVersion: '3.0.4' } });
  });

  it('when a bench rig is read, then the camera (vehicles only) is not expected, and an asset on a stage without a baseline has no statuses', async () => {
    const world = await makeSoftwareWorld(t);
    const rig = await softwareAsset(t, world, { kind: 'bench-rig' });
    const rigSoftware = await request(t.app).get(`/api/assets/${rig.id}/software`).set(world.auth('lead'));
    expect(rigSoftware.body.ecus.map((e: { ecu: { code: string } }) => e.ecu.code)).toEqual(['BCM', 'FZC', 'INV']);
    expect(rigSoftware.body.counts.missing).toBe(3);
    const bench = await createAsset(t, world, { kind: 'vehicle' });
    await flash(t, world, bench.id, { FZC: '4.2.1' });
    const benchSoftware = await request(t.app).get(`/api/assets/${bench.id}/software`).set(world.auth('lead'));
    expect(benchSoftware.body.baseline).toBeNull();
    expect(benchSoftware.body.ecus.every((e: { status: unknown }) => e.status === null)).toBe(true);
  });

  it.each([
    ['a version over 64 characters', { softwareVersion: 'x'.repeat(65) }, 'softwareVersion'],
    ['no version', { softwareNumber: 'SW1' }, 'softwareVersion'],
    ['a flash time in the future', { softwareVersion: '1.0.0', flashedAt: '2099-01-01T00:00:00Z' }, 'flashedAt'],
    ['an unknown field', { softwareVersion: '1.0.0', colour: 'red' }, 'colour'],
  ])('when a flash has %s, then 400 naming %s', async (_label, body, field) => {
    const world = await makeSoftwareWorld(t);
    const asset = await softwareAsset(t, world);
    const res = await request(t.app).put(`/api/assets/${asset.id}/software/${world.ecus.FZC.id}`).set(world.auth('technician')).send(body);
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.error.details.fields)).toContain(field);
  });

  it('when a flash is recorded with a stale record version, then 409 with the current software and nothing is written', async () => {
    const world = await makeSoftwareWorld(t);
    const asset = await softwareAsset(t, world);
    await flash(t, world, asset.id, { FZC: '4.2.0' });
    await flash(t, world, asset.id, { FZC: '4.2.1' });
    const res = await request(t.app).put(`/api/assets/${asset.id}/software/${world.ecus.FZC.id}`).set(world.auth('technician')).send({ softwareVersion: '4.2.2', version: 0 });
    expect(res.status).toBe(409);
    expect(res.body.error.details.current.ecus.find((e: { ecu: { code: string } }) => e.ecu.code === 'FZC').installed.softwareVersion).toBe('4.2.1');
  });

  it.each(['coordinator', 'driver', 'admin'] as const)('when a %s records a flash, then 403', async (role) => {
    const world = await makeSoftwareWorld(t);
    const asset = await softwareAsset(t, world);
    const res = await request(t.app).put(`/api/assets/${asset.id}/software/${world.ecus.FZC.id}`).set(world.auth(role)).send({ softwareVersion: '4.2.1' });
    expect(res.status).toBe(403);
  });
});

describe('program scoping of the software routes', () => {
  it('when a lead reads or writes objects of another program, then 404 and nothing changes', async () => {
    const mine = await makeSoftwareWorld(t);
    const other = await makeSoftwareWorld(t);
    const theirAsset = await softwareAsset(t, other);
    const draft = await makeBaseline(t, other, other.ecus, other.stages[2].id, { FZC: '4.2.1' }, false);
    const lead = mine.auth('lead');
    const calls = [
      request(t.app).get(`/api/ecus?programId=${other.program.id}`).set(lead),
      request(t.app).post('/api/ecus').set(lead).send({ programId: other.program.id, code: 'ZZZ', name: 'Z', assetKinds: ['vehicle'] }),
      request(t.app).patch(`/api/ecus/${other.ecus.FZC.id}`).set(lead).send({ name: 'Mine', version: 0 }),
      request(t.app).get(`/api/baselines?programId=${other.program.id}`).set(lead),
      request(t.app).get(`/api/baselines/${other.baseline.id}`).set(lead),
      request(t.app).post('/api/baselines').set(lead).send({ programId: other.program.id, stageId: other.stage.id, name: 'X', date: '2026-12-01' }),
      request(t.app).patch(`/api/baselines/${draft.id}`).set(lead).send({ name: 'Mine', version: draft.version }),
      request(t.app).post(`/api/baselines/${draft.id}/release`).set(lead).send({ version: draft.version }),
      request(t.app).delete(`/api/baselines/${draft.id}`).set(lead),
      request(t.app).get(`/api/baselines/${mine.baseline.id}/diff/${other.baseline.id}`).set(lead),
      request(t.app).get(`/api/assets/${theirAsset.id}/software`).set(lead),
      request(t.app).put(`/api/assets/${theirAsset.id}/software/${other.ecus.FZC.id}`).set(lead).send({ softwareVersion: '9.9.9' }),
      request(t.app).get(`/api/software/matrix?programId=${other.program.id}`).set(lead),
      request(t.app).get(`/api/software/reflash?programId=${other.program.id}`).set(lead),
      request(t.app).get(`/api/software/reflash.csv?programId=${other.program.id}`).set(lead),
      request(t.app).post('/api/software/reflash/done').set(lead).send({ assetId: theirAsset.id, ecuId: other.ecus.FZC.id, version: '9.9.9' }),
      request(t.app).post('/api/software/import/preview').set(lead).send({ programId: other.program.id, rows: [{ tag: theirAsset.tag, ecu: 'FZC', F189: '9.9.9' }] }),
      request(t.app).post('/api/software/import/apply').set(lead).send({ programId: other.program.id, rows: [{ tag: theirAsset.tag, ecu: 'FZC', F189: '9.9.9' }] }),
      // My asset with their ECU, and my matrix filtered by their stage.
      request(t.app).put(`/api/assets/${(await softwareAsset(t, mine)).id}/software/${other.ecus.FZC.id}`).set(lead).send({ softwareVersion: '9.9.9' }),
      request(t.app).get(`/api/software/matrix?programId=${mine.program.id}&stageId=${other.stage.id}`).set(lead),
    ];
    const statuses = (await Promise.all(calls)).map((r, i) => [i, r.status]);
    expect(statuses).toEqual(statuses.map(([i]) => [i, 404]));
    const [rows] = (await t.sequelize.query(`SELECT count(*)::int AS n FROM installed_software WHERE asset_id = $1`, { bind: [theirAsset.id] })) as [Array<{ n: number }>, unknown];
    expect(rows[0].n).toBe(0);
    const stillDraft = await request(t.app).get(`/api/baselines/${draft.id}`).set(other.auth('lead'));
    expect(stillDraft.body).toMatchObject({ name: 'Test release', status: 'draft' });
  });

  it('when nobody is signed in, then every software route answers 401', async () => {
    const software = t.routes.filter((r) => /^\/api\/(ecus|baselines|software|calc\/version-compare)|\/software/.test(r.path));
    expect(software.length).toBeGreaterThanOrEqual(18);
    for (const route of software) {
      const url = route.path.replace(/:[A-Za-z]+/g, '00000000-0000-4000-8000-000000000000');
      const res = await request(t.app)[route.method](url).send({});
      expect({ route: `${route.method} ${route.path}`, status: res.status }).toEqual({ route: `${route.method} ${route.path}`, status: 401 });
    }
  });
});
