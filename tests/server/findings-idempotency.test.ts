import crypto from 'node:crypto';
import sharp from 'sharp';
import request from 'supertest';
import { fileFinding, makeFindingWorld, muteFindingMail, type FindingWorld } from '../helpers/findings';
import { makeTestApp, uid } from '../helpers/test-app';

const t = makeTestApp();
afterAll(() => t.close());

let world: FindingWorld;
beforeAll(async () => {
  world = await makeFindingWorld(t);
  await muteFindingMail(t, world);
});

const key = () => `key-${crypto.randomUUID()}`;
const count = async (sql: string, bind: unknown[]) =>
  ((await t.sequelize.query(sql, { bind })) as [Array<{ n: number }>, unknown])[0][0].n;
const findingsTitled = (title: string) => count(`SELECT count(*)::int AS n FROM findings WHERE title = $1`, [title]);
const post = (path: string, k: string, role: 'technician' | 'driver' | 'engineer' = 'technician') =>
  request(t.app).post(path).set(world.auth(role)).set('Idempotency-Key', k);
const jpeg = (shade: string) => sharp({ create: { width: 40, height: 30, channels: 3, background: shade } }).jpeg().toBuffer();

describe('a retried create of a finding (Idempotency-Key)', () => {
  it('when the same key and body come again, then the first answer comes back (same status and body) and one finding exists', async () => {
    const k = key();
    const body = { assetId: world.asset.id, title: `Offline capture ${uid()}`, severity: 'major' };
    const first = await post('/api/findings', k).send(body);
    expect(first.status).toBe(201);
    const again = await post('/api/findings', k).send({ severity: 'major', title: body.title, assetId: body.assetId });
    expect(again.status).toBe(201);
    expect(again.body).toEqual(first.body);
    expect(again.headers['idempotent-replayed']).toBe('true');
    expect(await findingsTitled(body.title)).toBe(1);
    expect(await count(`SELECT count(*)::int AS n FROM history_entries WHERE entity_id = $1`, [first.body.id])).toBe(1);
  });

  it('when the same key comes with a different body, then 422 request/idempotency-mismatch and nothing new', async () => {
    const k = key();
    const title = `Mismatch ${uid()}`;
    expect((await post('/api/findings', k).send({ assetId: world.asset.id, title, severity: 'major' })).status).toBe(201);
    const other = await post('/api/findings', k).send({ assetId: world.asset.id, title, severity: 'minor' });
    expect(other.status).toBe(422);
    expect(other.body.error.code).toBe('request/idempotency-mismatch');
    expect(await findingsTitled(title)).toBe(1);
  });

  it('when the same request is sent three times at once, then all three answer with the same finding and one exists', async () => {
    const k = key();
    const body = { assetId: world.asset.id, title: `Racing retries ${uid()}`, severity: 'blocking' };
    const answers = await Promise.all([1, 2, 3].map(() => post('/api/findings', k).send(body)));
    expect(answers.map((a) => a.status)).toEqual([201, 201, 201]);
    expect(new Set(answers.map((a) => a.body.id)).size).toBe(1);
    expect(await findingsTitled(body.title)).toBe(1);
  });

  it('when two people use the same key, then each gets their own finding (keys are per user)', async () => {
    const k = key();
    const body = { assetId: world.asset.id, title: `Shared key ${uid()}`, severity: 'minor' };
    const a = await post('/api/findings', k, 'technician').send(body);
    const b = await post('/api/findings', k, 'driver').send(body);
    expect([a.status, b.status]).toEqual([201, 201]);
    expect(a.body.id).not.toBe(b.body.id);
    expect(await findingsTitled(body.title)).toBe(2);
  });

  it('when the first try failed, then the key is free again and a corrected retry is created', async () => {
    const k = key();
    const title = `Fixed retry ${uid()}`;
    const bad = await post('/api/findings', k).send({ assetId: world.asset.id, title, severity: 'cosmetic' });
    expect(bad.status).toBe(400);
    const good = await post('/api/findings', k).send({ assetId: world.asset.id, title, severity: 'minor' });
    expect(good.status).toBe(201);
    expect(await findingsTitled(title)).toBe(1);
  });

  it('when the key is malformed, then 400 naming the header and nothing is created', async () => {
    const title = `Bad key ${uid()}`;
    const res = await post('/api/findings', 'short').send({ assetId: world.asset.id, title, severity: 'minor' });
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.error.details.fields)).toEqual(['Idempotency-Key']);
    expect(await findingsTitled(title)).toBe(0);
  });

  it('when a key is reused on another route, then 422', async () => {
    const k = key();
    const finding = await fileFinding(t, world);
    expect((await post(`/api/findings/${finding.id}/comments`, k).send({ body: 'First use of the key.' })).status).toBe(201);
    const res = await post('/api/findings', k).send({ assetId: world.asset.id, title: 'Other route', severity: 'minor' });
    expect(res.status).toBe(422);
  });

  it('when the stored answer is lost with a crash (the first try committed but never answered), then the retry still makes no second finding', async () => {
    const k = key();
    const body = { assetId: world.asset.id, title: `Crashed first try ${uid()}`, severity: 'minor' };
    const first = await post('/api/findings', k).send(body);
    // As if the process died between the commit and storing the answer, and the claim went stale.
    await t.sequelize.query(`UPDATE idempotency_keys SET status_code = NULL, response = NULL, created_at = now() - interval '5 minutes' WHERE key = $1`, {
      bind: [k],
    });
    const retry = await post('/api/findings', k).send(body);
    expect(retry.status).toBe(201);
    expect(retry.body.id).toBe(first.body.id);
    expect(await findingsTitled(body.title)).toBe(1);
  });
});

describe('retried comments and photos', () => {
  it('when a comment is sent twice with one key, then one comment exists and the replay answers the same', async () => {
    const finding = await fileFinding(t, world);
    const k = key();
    const a = await post(`/api/findings/${finding.id}/comments`, k, 'driver').send({ body: 'Seen on the loop.' });
    const b = await post(`/api/findings/${finding.id}/comments`, k, 'driver').send({ body: 'Seen on the loop.' });
    expect([a.status, b.status]).toEqual([201, 201]);
    expect(b.body).toEqual(a.body);
    const list = await request(t.app).get(`/api/findings/${finding.id}/comments`).set(world.auth('lead'));
    expect(list.body.items).toHaveLength(1);
    const mismatch = await post(`/api/findings/${finding.id}/comments`, k, 'driver').send({ body: 'Something else.' });
    expect(mismatch.status).toBe(422);
  });

  it('when a photo upload is sent twice with one key, then one photo is stored; another photo under the same key answers 422', async () => {
    const finding = await fileFinding(t, world);
    const k = key();
    const image = await jpeg('#2a6');
    const a = await post(`/api/findings/${finding.id}/photos`, k, 'driver').attach('photo', image, 'a.jpg');
    const b = await post(`/api/findings/${finding.id}/photos`, k, 'driver').attach('photo', image, 'a.jpg');
    expect([a.status, b.status]).toEqual([201, 201]);
    expect(b.body.id).toBe(a.body.id);
    expect(await count(`SELECT count(*)::int AS n FROM photos WHERE finding_id = $1`, [finding.id])).toBe(1);
    expect(await count(`SELECT count(*)::int AS n FROM history_entries WHERE entity_id = $1 AND action = 'photo-added'`, [finding.id])).toBe(1);
    const other = await post(`/api/findings/${finding.id}/photos`, k, 'driver').attach('photo', await jpeg('#a62'), 'b.jpg');
    expect(other.status).toBe(422);
    expect(await count(`SELECT count(*)::int AS n FROM photos WHERE finding_id = $1`, [finding.id])).toBe(1);
  });
});
