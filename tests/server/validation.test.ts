import sharp from 'sharp';
import request from 'supertest';
import { validationPartsForAssets } from '../../server/services/validation';
import type { Allocation, ValidationTest } from '../../shared/schemas/validation';
import { createAsset, makeWorld, type World } from '../helpers/assets';
import { makeTestApp } from '../helpers/test-app';
import { allocate, planTest } from '../helpers/validation';

const t = makeTestApp();
afterAll(() => t.close());

let world: World;
beforeAll(async () => {
  world = await makeWorld(t);
});

const calc = (path: string, role: 'driver' | 'lead' = 'driver') => request(t.app).get(path).set(world.auth(role));

describe('calculation endpoints', () => {
  it('when any signed-in user asks for R 0.9, C 0.9, then n = 22 (21.85 before rounding; REFERENCES.md success run)', async () => {
    const res = await calc('/api/calc/sample-size?reliability=0.9&confidence=0.9');
    expect(res.status).toBe(200);
    expect(res.body.n).toBe(22);
    expect(res.body.exact).toBeCloseTo(21.854, 3);
  });

  it('when L and b are given (C. J. Wang Weibayes example R 0.95, C 0.9, L 1, b 1), then n = 45; blank L and b count as not given', async () => {
    const wang = await calc('/api/calc/sample-size?reliability=0.95&confidence=0.9&testToLife=1&shape=1');
    expect(wang.body).toEqual({ n: 45, exact: expect.closeTo(44.891, 3) });
    const blank = await calc('/api/calc/sample-size?reliability=0.9&confidence=0.9&testToLife=&shape=');
    expect(blank.body.n).toBe(22);
    const weibayes = await calc('/api/calc/sample-size?reliability=0.9&confidence=0.9&testToLife=2&shape=2');
    expect(weibayes.body.n).toBe(6);
  });

  it('when 22 samples passed at C 0.9, then the demonstrated reliability is 0.1^(1/22) = 0.90063', async () => {
    const res = await calc('/api/calc/demonstrated-reliability?samples=22&confidence=0.9');
    expect(res.status).toBe(200);
    expect(res.body.reliability).toBeCloseTo(0.90063, 5);
  });

  it('when the dew point of 20 degC at 50 %RH is asked, then 9.26 degC (REFERENCES.md, Magnus / Alduchov-Eskridge)', async () => {
    const res = await calc('/api/calc/dew-point?temperature=20&humidity=50');
    expect(res.status).toBe(200);
    expect(res.body).toEqual({ dewPoint: 9.26, note: null });
    const cold = await calc('/api/calc/dew-point?temperature=-10&humidity=80');
    expect(cold.body.dewPoint).toBeCloseTo(-12.8, 1);
    expect(cold.body.note).toMatch(/ice/);
  });

  it.each([
    ['/api/calc/sample-size?reliability=1.2&confidence=0.9', 'reliability'],
    ['/api/calc/sample-size?reliability=0&confidence=0.9', 'reliability'],
    ['/api/calc/sample-size?reliability=0.9&confidence=1', 'confidence'],
    ['/api/calc/sample-size?reliability=0.9', 'confidence'],
    ['/api/calc/sample-size?reliability=abc&confidence=0.9', 'reliability'],
    ['/api/calc/sample-size?reliability=0.9&confidence=0.9&testToLife=0&shape=2', 'testToLife'],
    ['/api/calc/sample-size?reliability=0.9&confidence=0.9&testToLife=2&shape=-1', 'shape'],
    ['/api/calc/sample-size?reliability=0.9&confidence=0.9&testToLife=2', 'shape'],
    ['/api/calc/sample-size?reliability=0.9&confidence=0.9&extra=1', 'extra'],
    ['/api/calc/sample-size?reliability=0.9&reliability=0.8&confidence=0.9', 'reliability'],
    ['/api/calc/demonstrated-reliability?samples=0&confidence=0.9', 'samples'],
    ['/api/calc/demonstrated-reliability?samples=2.5&confidence=0.9', 'samples'],
    ['/api/calc/demonstrated-reliability?samples=10&confidence=0', 'confidence'],
    ['/api/calc/dew-point?temperature=20&humidity=0', 'humidity'],
    ['/api/calc/dew-point?temperature=20&humidity=100.5', 'humidity'],
    ['/api/calc/dew-point?temperature=-120&humidity=50', 'temperature'],
    ['/api/calc/dew-point?temperature=250&humidity=50', 'temperature'],
    ['/api/calc/dew-point?humidity=50', 'temperature'],
  ])('when %s is asked, then 400 with the reason naming %s', async (path, field) => {
    const res = await calc(path);
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('request/invalid');
    expect(Object.keys(res.body.error.details.fields)).toContain(field);
    expect(res.body.error.message).toContain(field);
  });

  it('when nobody is signed in, then the calculations answer 401', async () => {
    for (const path of ['/api/calc/sample-size?reliability=0.9&confidence=0.9', '/api/calc/demonstrated-reliability?samples=2&confidence=0.9', '/api/calc/dew-point?temperature=20&humidity=50']) {
      expect((await request(t.app).get(path)).status).toBe(401);
    }
  });
});

describe('the validation plan', () => {
  it('when an engineer plans a test, then its sample size is computed and stored, and history records it', async () => {
    const test = await planTest(t, world, { name: 'Thermal shock (IEC 60068-2-14 Na)', procedureRef: 'IEC 60068-2-14 Na', verifies: 'Solder joints', testToLife: 2, shape: 2 });
    expect(test).toMatchObject({ programId: world.program.id, stageId: world.stages[2].id, requiredSamples: 6, status: 'planned', allocations: [], version: 0 });
    const [rows] = (await t.sequelize.query(`SELECT required_samples FROM validation_tests WHERE id = $1`, { bind: [test.id] })) as [Array<{ required_samples: number }>, unknown];
    expect(rows[0].required_samples).toBe(6);
    const [history] = (await t.sequelize.query(`SELECT action FROM history_entries WHERE entity_type = 'validation-test' AND entity_id = $1`, { bind: [test.id] })) as [Array<{ action: string }>, unknown];
    expect(history.map((h) => h.action)).toEqual(['created']);
  });

  it.each(['technician', 'coordinator', 'driver', 'admin'] as const)('when a %s plans or changes a test, then 403', async (role) => {
    const test = await planTest(t, world);
    const create = await request(t.app).post('/api/validation/tests').set(world.auth(role)).send({ stageId: world.stages[2].id, name: 'X', reliability: 0.9, confidence: 0.9 });
    expect(create.status).toBe(403);
    const patch = await request(t.app).patch(`/api/validation/tests/${test.id}`).set(world.auth(role)).send({ name: 'Y', version: test.version });
    expect(patch.status).toBe(403);
    const alloc = await request(t.app).post(`/api/validation/tests/${test.id}/allocations`).set(world.auth(role)).send({ assetId: world.program.id });
    expect(alloc.status).toBe(403);
  });

  it('when every member lists the plan, then they see the tests of the stage; a stage of another program answers 404', async () => {
    const test = await planTest(t, world);
    for (const role of ['technician', 'coordinator', 'driver', 'lead'] as const) {
      const res = await request(t.app).get(`/api/validation/tests?programId=${world.program.id}&stageId=${world.stages[2].id}`).set(world.auth(role));
      expect(res.status).toBe(200);
      expect((res.body.tests as ValidationTest[]).map((x) => x.id)).toContain(test.id);
    }
    const other = await makeWorld(t);
    const res = await request(t.app).get(`/api/validation/tests?programId=${world.program.id}&stageId=${other.stages[2].id}`).set(world.auth('lead'));
    expect(res.status).toBe(404);
  });

  it('when a lead changes R, then n is recomputed; a stale version answers 409 with the current test; L without b answers 400 naming shape', async () => {
    const test = await planTest(t, world);
    const res = await request(t.app).patch(`/api/validation/tests/${test.id}`).set(world.auth('lead')).send({ reliability: 0.95, version: test.version });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ reliability: 0.95, requiredSamples: 45, version: test.version + 1 });
    const stale = await request(t.app).patch(`/api/validation/tests/${test.id}`).set(world.auth('lead')).send({ name: 'Late', version: test.version });
    expect(stale.status).toBe(409);
    expect(stale.body.error.details.current.requiredSamples).toBe(45);
    const half = await request(t.app).patch(`/api/validation/tests/${test.id}`).set(world.auth('lead')).send({ testToLife: 2, version: res.body.version });
    expect(half.status).toBe(400);
    expect(Object.keys(half.body.error.details.fields)).toEqual(['shape']);
    const both = await request(t.app).patch(`/api/validation/tests/${test.id}`).set(world.auth('lead')).send({ testToLife: 3, shape: 2, version: res.body.version });
    expect(both.body.requiredSamples).toBe(5);
  });

  it('when a test is planned with a bad target or a taken name, then 400 naming the field, or 409', async () => {
    const bad = await request(t.app).post('/api/validation/tests').set(world.auth('engineer')).send({ stageId: world.stages[2].id, name: 'Bad', reliability: 1, confidence: 0.9 });
    expect(bad.status).toBe(400);
    expect(Object.keys(bad.body.error.details.fields)).toEqual(['reliability']);
    const test = await planTest(t, world);
    const dup = await request(t.app).post('/api/validation/tests').set(world.auth('engineer')).send({ stageId: world.stages[2].id, name: test.name.toUpperCase(), reliability: 0.9, confidence: 0.9 });
    expect(dup.status).toBe(409);
    expect(dup.body.error.code).toBe('validation/test-name-taken');
  });

  it('when assets are allocated, then each once; an asset of another program answers 400 naming assetId', async () => {
    const test = await planTest(t, world);
    const asset = await createAsset(t, world);
    const after = await allocate(t, world, test.id, asset.id);
    expect(after.allocations).toEqual([expect.objectContaining({ assetId: asset.id, assetTag: asset.tag, status: 'planned', findingId: null, reportPhotoId: null })]);
    const again = await request(t.app).post(`/api/validation/tests/${test.id}/allocations`).set(world.auth('lead')).send({ assetId: asset.id });
    expect(again.status).toBe(409);
    expect(again.body.error.code).toBe('validation/already-allocated');
    const foreign = await createAsset(t, await makeWorld(t));
    const res = await request(t.app).post(`/api/validation/tests/${test.id}/allocations`).set(world.auth('lead')).send({ assetId: foreign.id });
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.error.details.fields)).toEqual(['assetId']);
  });
});

describe('results', () => {
  it('when a technician records a failure, then a blocking finding opens on the asset, is linked, and the test fails', async () => {
    const test = await planTest(t, world, { testToLife: 3, shape: 2 });
    const asset = await createAsset(t, world);
    const allocation = (await allocate(t, world, test.id, asset.id)).allocations[0];
    const running = await request(t.app).patch(`/api/validation/allocations/${allocation.id}`).set(world.auth('technician')).send({ status: 'running', version: allocation.version });
    expect(running.status).toBe(200);
    const failed = await request(t.app)
      .patch(`/api/validation/allocations/${allocation.id}`)
      .set(world.auth('technician'))
      .send({ status: 'failed', resultNotes: 'Isolation below the limit after cycle 4.', version: running.body.version });
    expect(failed.status).toBe(200);
    const body = failed.body as Allocation;
    expect(body).toMatchObject({ status: 'failed', resultNotes: 'Isolation below the limit after cycle 4.', findingId: expect.any(String) });
    const finding = await request(t.app).get(`/api/findings/${body.findingId}`).set(world.auth('lead'));
    expect(finding.body).toMatchObject({ assetId: asset.id, severity: 'blocking', status: 'open', description: 'Isolation below the limit after cycle 4.' });
    expect(finding.body.title).toContain(test.name);
    const [history] = (await t.sequelize.query(`SELECT action, note FROM history_entries WHERE entity_type = 'finding' AND entity_id = $1`, { bind: [body.findingId] })) as [Array<{ action: string; note: string }>, unknown];
    expect(history).toEqual([{ action: 'created', note: 'Opened from a failed validation test.' }]);
    const after = await request(t.app).get(`/api/validation/tests/${test.id}`).set(world.auth('driver'));
    expect(after.body).toMatchObject({ status: 'failed', demonstratedReliability: null });

    // A re-run that fails again while the finding is still open keeps the one finding.
    const rerun = await request(t.app).patch(`/api/validation/allocations/${allocation.id}`).set(world.auth('engineer')).send({ status: 'running', version: body.version });
    const again = await request(t.app).patch(`/api/validation/allocations/${allocation.id}`).set(world.auth('engineer')).send({ status: 'failed', version: rerun.body.version });
    expect(again.body.findingId).toBe(body.findingId);
    const [count] = (await t.sequelize.query(`SELECT count(*)::int AS n FROM findings WHERE asset_id = $1`, { bind: [asset.id] })) as [Array<{ n: number }>, unknown];
    expect(count[0].n).toBe(1);
  });

  it('when enough samples pass, then the test passes and shows the reliability demonstrated', async () => {
    // R 0.95, C 0.9, L 3, b 2: n = 44.891 / 9 = 4.99 -> 5; one sample short first.
    const test = await planTest(t, world, { reliability: 0.95, testToLife: 3, shape: 2 });
    expect(test.requiredSamples).toBe(5);
    let current = test;
    for (let i = 0; i < 5; i++) current = await allocate(t, world, test.id, (await createAsset(t, world)).id);
    for (const [i, a] of current.allocations.entries()) {
      const res = await request(t.app).patch(`/api/validation/allocations/${a.id}`).set(world.auth('technician')).send({ status: 'passed', version: a.version });
      expect(res.status).toBe(200);
      const now = (await request(t.app).get(`/api/validation/tests/${test.id}`).set(world.auth('lead'))).body as ValidationTest;
      expect(now.status).toBe(i < 4 ? 'running' : 'passed');
      expect(now.passedSamples).toBe(i + 1);
      // (1 - C)^(1/(n L^b)) with n samples passed.
      expect(now.demonstratedReliability).toBeCloseTo(Math.pow(0.1, 1 / ((i + 1) * 9)), 10);
    }
  });

  it('when an allocation is changed with a stale version, then 409 with the current one; a coordinator may not record results', async () => {
    const test = await planTest(t, world);
    const allocation = (await allocate(t, world, test.id, (await createAsset(t, world)).id)).allocations[0];
    await request(t.app).patch(`/api/validation/allocations/${allocation.id}`).set(world.auth('lead')).send({ status: 'running', version: allocation.version });
    const stale = await request(t.app).patch(`/api/validation/allocations/${allocation.id}`).set(world.auth('lead')).send({ status: 'passed', version: allocation.version });
    expect(stale.status).toBe(409);
    expect(stale.body.error.details.current.status).toBe('running');
    const coordinator = await request(t.app).patch(`/api/validation/allocations/${allocation.id}`).set(world.auth('coordinator')).send({ status: 'passed', version: 1 });
    expect(coordinator.status).toBe(403);
  });
});

describe('reports', () => {
  let allocation: Allocation;
  beforeAll(async () => {
    const test = await planTest(t, world);
    allocation = (await allocate(t, world, test.id, (await createAsset(t, world)).id)).allocations[0];
  });
  const upload = (body: Buffer, name: string, contentType: string) =>
    request(t.app).post(`/api/validation/allocations/${allocation.id}/report`).set(world.auth('technician')).attach('report', body, { filename: name, contentType });

  it('when a PDF is attached, then it is stored like a photo and served back by its signed URL', async () => {
    const pdf = Buffer.from('%PDF-1.4\n1 0 obj << /Type /Catalog >> endobj\ntrailer << /Root 1 0 R >>\n%%EOF\n');
    const res = await upload(pdf, 'report.bin', 'application/octet-stream');
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({ reportContentType: 'application/pdf', reportPhotoId: expect.any(String), reportUrl: expect.stringContaining('sig=') });
    const file = await request(t.app).get(res.body.reportUrl).buffer(true).parse((r, cb) => {
      const chunks: Buffer[] = [];
      r.on('data', (c: Buffer) => chunks.push(c));
      r.on('end', () => cb(null, Buffer.concat(chunks)));
    });
    expect(file.status).toBe(200);
    expect(file.headers['content-type']).toBe('application/pdf');
    expect(Buffer.compare(file.body as Buffer, pdf)).toBe(0);
    const [rows] = (await t.sequelize.query(`SELECT allocation_id FROM photos WHERE id = $1`, { bind: [res.body.reportPhotoId] })) as [Array<{ allocation_id: string }>, unknown];
    expect(rows[0].allocation_id).toBe(allocation.id);
  });

  it('when a picture follows, then it becomes the report (checked by its bytes, whatever its name says)', async () => {
    const png = await sharp({ create: { width: 40, height: 30, channels: 3, background: '#456' } }).png().toBuffer();
    const res = await upload(png, 'scan.pdf', 'application/pdf');
    expect(res.status).toBe(201);
    expect(res.body.reportContentType).toBe('image/png');
  });

  it('when the file is neither a PDF nor a picture, then 415 and nothing is stored', async () => {
    const before = await t.sequelize.query(`SELECT count(*)::int AS n FROM photos WHERE allocation_id = $1`, { bind: [allocation.id] });
    const res = await upload(Buffer.from('Step,hours\nSoak,4\n'), 'report.pdf', 'application/pdf');
    expect(res.status).toBe(415);
    expect(Object.keys(res.body.error.details.fields)).toEqual(['report']);
    const after = await t.sequelize.query(`SELECT count(*)::int AS n FROM photos WHERE allocation_id = $1`, { bind: [allocation.id] });
    expect(after[0]).toEqual(before[0]);
  });

  it('when the file is over 20 MB, then 413; when none is sent, then 400 naming report', async () => {
    const big = Buffer.alloc(20 * 1024 * 1024 + 1, 0x20);
    big.write('%PDF-1.7\n', 0, 'latin1');
    const res = await upload(big, 'big.pdf', 'application/pdf');
    expect(res.status).toBe(413);
    const none = await request(t.app).post(`/api/validation/allocations/${allocation.id}/report`).set(world.auth('technician')).field('note', 'x');
    expect(none.status).toBe(400);
    expect(Object.keys(none.body.error.details.fields)).toEqual(['report']);
  });
});

describe('program scoping', () => {
  it("when a lead reaches another program's tests, allocations and plan, then 404 and nothing changes", async () => {
    const other = await makeWorld(t);
    const test = await planTest(t, other);
    const allocation = (await allocate(t, other, test.id, (await createAsset(t, other)).id)).allocations[0];
    const mine = await createAsset(t, world);
    const calls = [
      request(t.app).get(`/api/validation/tests?programId=${other.program.id}`),
      request(t.app).get(`/api/validation/tests/${test.id}`),
      request(t.app).patch(`/api/validation/tests/${test.id}`).send({ name: 'Taken over', version: test.version }),
      request(t.app).post(`/api/validation/tests/${test.id}/allocations`).send({ assetId: mine.id }),
      request(t.app).patch(`/api/validation/allocations/${allocation.id}`).send({ status: 'failed', version: allocation.version }),
      request(t.app).post(`/api/validation/allocations/${allocation.id}/report`).attach('report', Buffer.from('%PDF-1.4\n'), 'r.pdf'),
      request(t.app).post('/api/validation/tests').send({ stageId: other.stages[2].id, name: 'Injected', reliability: 0.9, confidence: 0.9 }),
    ];
    for (const [i, call] of calls.entries()) {
      const res = await call.set(world.auth('lead'));
      expect({ call: i, status: res.status }).toEqual({ call: i, status: 404 });
    }
    const [rows] = (await t.sequelize.query(`SELECT t.name, t.version, a.status FROM validation_tests t JOIN test_allocations a ON a.test_id = t.id WHERE t.id = $1`, {
      bind: [test.id],
    })) as [Array<{ name: string; version: number; status: string }>, unknown];
    expect(rows).toEqual([{ name: test.name, version: 0, status: 'planned' }]);
  });

  it('when a path id is not a uuid, then 404', async () => {
    for (const path of ['/api/validation/tests/nope', '/api/campaigns/nope', '/api/assets/nope/campaigns']) {
      expect((await request(t.app).get(path).set(world.auth('lead'))).status).toBe(404);
    }
  });
});

describe('validationPartsForAssets (for readiness)', () => {
  it('when assets carry allocations, then each gets allocated, passed and what is not passed, by asset ids or by program, in one statement', async () => {
    const w = await makeWorld(t);
    const [a, b, c] = [await createAsset(t, w), await createAsset(t, w), await createAsset(t, w)];
    const t1 = await planTest(t, w, { name: 'A first test' });
    const t2 = await planTest(t, w, { name: 'B second test' });
    const x1 = (await allocate(t, w, t1.id, a.id)).allocations[0];
    await allocate(t, w, t2.id, a.id);
    await request(t.app).patch(`/api/validation/allocations/${x1.id}`).set(w.auth('lead')).send({ status: 'passed', version: x1.version });
    const y = (await allocate(t, w, t1.id, b.id)).allocations.find((x) => x.assetId === b.id)!;
    await request(t.app).patch(`/api/validation/allocations/${y.id}`).set(w.auth('lead')).send({ status: 'failed', version: y.version });

    // A repeated id counts once.
    const parts = await validationPartsForAssets(t.sequelize, [a.id, b.id, c.id, a.id]);
    expect(parts.get(a.id)).toEqual({ allocated: 2, passed: 1, notPassed: [{ testId: t2.id, name: 'B second test', status: 'planned' }] });
    expect(parts.get(b.id)).toEqual({ allocated: 1, passed: 0, notPassed: [{ testId: t1.id, name: 'A first test', status: 'failed' }] });
    expect(parts.get(c.id)).toEqual({ allocated: 0, passed: 0, notPassed: [] });

    const byProgram = await validationPartsForAssets(t.sequelize, w.program.id);
    expect([...byProgram.keys()].sort()).toEqual([a.id, b.id, c.id].sort());
    expect(byProgram.get(a.id)).toEqual(parts.get(a.id));

    // Counted at the driver: the helper sends exactly one SQL statement.
    const seen: string[] = [];
    const logged = await validationPartsForAssets(
      new Proxy(t.sequelize, {
        get(target, prop, receiver) {
          if (prop === 'query') return (...args: Parameters<typeof t.sequelize.query>) => (seen.push(String(args[0])), target.query(...args));
          return Reflect.get(target, prop, receiver);
        },
      }),
      w.program.id,
    );
    expect(seen).toHaveLength(1);
    expect(logged.size).toBe(3);
  });
});
