import sharp from 'sharp';
import request from 'supertest';
import { PHOTO_MAX_BYTES, PHOTO_MAX_PIXELS, PhotoSchema, type Checklist } from '../../shared/schemas/assets';
import { signedPhotoUrl } from '../../server/services/photos';
import { createAsset, makeWorld, type World } from '../helpers/assets';
import { makeTestApp, uid } from '../helpers/test-app';

const t = makeTestApp();
afterAll(() => t.close());

const picture = (format: 'jpeg' | 'png' | 'webp' | 'gif', width = 640, height = 480) => {
  const drawing = Buffer.from(`<svg width="${width}" height="${height}"><circle cx="${width / 2}" cy="${height / 2}" r="${height / 4}" fill="#e9a23b"/></svg>`);
  const image = sharp({ create: { width, height, channels: 3, background: { r: 90, g: 120, b: 160 } } }).composite([{ input: drawing }]);
  return image.toFormat(format).toBuffer();
};

const upload = (world: World, assetId: string, file: Buffer, opts: { role?: 'technician' | 'driver' | 'lead'; filename?: string; contentType?: string; key?: string; itemId?: string } = {}) => {
  let req = request(t.app).post(`/api/assets/${assetId}/photos`).set(world.auth(opts.role ?? 'technician'));
  if (opts.key) req = req.set('Idempotency-Key', opts.key);
  if (opts.itemId) req = req.field('checklistItemId', opts.itemId);
  return req.attach('photo', file, { filename: opts.filename ?? 'photo.jpg', contentType: opts.contentType ?? 'image/jpeg' });
};

let world: World;
let assetId: string;
let jpeg: Buffer;
beforeAll(async () => {
  world = await makeWorld(t);
  assetId = (await createAsset(t, world)).id;
  jpeg = await picture('jpeg');
});

describe('uploading photos', () => {
  it.each([
    ['a JPEG', 'jpeg', 'image/jpeg'],
    ['a PNG', 'png', 'image/png'],
    ['a WebP', 'webp', 'image/webp'],
  ] as const)('when %s is uploaded, then 201 with the photo, its original and a ~320 px JPEG thumbnail in S3', async (_label, format, contentType) => {
    const bytes = await picture(format);
    const res = await upload(world, assetId, bytes, { filename: `shot.${format}`, contentType: 'application/octet-stream' });
    expect(res.status).toBe(201);
    const photo = PhotoSchema.parse(res.body);
    expect(photo).toMatchObject({ assetId, contentType, bytes: bytes.length, width: 640, height: 480, checklistItemId: null });
    const original = await request(t.app).get(`/api/photos/${photo.id}`).set(world.auth('driver'));
    expect(original.status).toBe(200);
    expect(original.headers['content-type']).toBe(contentType);
    expect(original.headers['cache-control']).toMatch(/^private/);
    expect(Buffer.compare(original.body as Buffer, bytes)).toBe(0);
    const thumb = await request(t.app).get(photo.thumbnailUrl);
    expect(thumb.status).toBe(200);
    const meta = await sharp(thumb.body as Buffer).metadata();
    expect([meta.format, meta.width, meta.height]).toEqual(['jpeg', 320, 240]);
  });

  it('when a HEIC photo comes (HEVC, which the prebuilt libvips cannot decode: lovell/sharp#4050), then it is kept as image/heic with a placeholder thumbnail', async () => {
    // An ISO-BMFF file: a 24-byte ftyp box with the brand heic (ISO/IEC 23008-12), then an empty meta box.
    const ftyp = Buffer.concat([Buffer.from([0, 0, 0, 24]), Buffer.from('ftypheic', 'latin1'), Buffer.from([0, 0, 0, 0]), Buffer.from('mif1heic', 'latin1')]);
    const heic = Buffer.concat([ftyp, Buffer.from([0, 0, 0, 8]), Buffer.from('meta', 'latin1')]);
    const res = await upload(world, assetId, heic, { filename: 'IMG_0001.HEIC', contentType: 'image/heic' });
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({ contentType: 'image/heic', bytes: heic.length });
    const thumb = await request(t.app).get(res.body.thumbnailUrl);
    expect(thumb.status).toBe(200);
    expect((await sharp(thumb.body as Buffer).metadata()).format).toBe('jpeg');
  });

  it.each([
    ['a text file named .jpg', Buffer.from('just some text, not a picture at all'), 'notes.jpg'],
    ['an SVG drawing', Buffer.from('<svg xmlns="http://www.w3.org/2000/svg" width="10" height="10"><script>alert(1)</script></svg>'), 'x.jpg'],
    ['a GIF', null, 'anim.jpg'],
  ])('when %s is uploaded, then 415 upload/unsupported-type with a plain message', async (_label, bytes, filename) => {
    const file = bytes ?? (await picture('gif', 20, 20));
    const res = await upload(world, assetId, file, { filename });
    expect(res.status).toBe(415);
    expect(res.body.error.code).toBe('upload/unsupported-type');
    expect(res.body.error.message).toMatch(/JPEG, PNG, WebP or HEIC/);
  });

  it('when a file is over PHOTO_MAX_BYTES, then 413 and nothing is stored', async () => {
    const before = await photoCount(assetId);
    const res = await upload(world, assetId, Buffer.concat([jpeg, Buffer.alloc(PHOTO_MAX_BYTES)]));
    expect(res.status).toBe(413);
    expect(res.body.error.code).toBe('upload/too-large');
    expect(await photoCount(assetId)).toBe(before);
  });

  it('when a small file declares more than PHOTO_MAX_PIXELS pixels, then 413 upload/too-many-pixels with the reason', async () => {
    const bomb = await sharp({ create: { width: 8000, height: 6000, channels: 3, background: '#777' } }).png({ compressionLevel: 9 }).toBuffer();
    expect(bomb.length).toBeLessThan(PHOTO_MAX_BYTES);
    expect(8000 * 6000).toBeGreaterThan(PHOTO_MAX_PIXELS);
    const res = await upload(world, assetId, bomb, { filename: 'big.png' });
    expect(res.status).toBe(413);
    expect(res.body.error.code).toBe('upload/too-many-pixels');
    expect(res.body.error.message).toMatch(/48 million pixels; the limit is 40 million/);
  });

  it('when no file is sent, or it is sent under another field name, then 400 naming photo', async () => {
    const none = await request(t.app).post(`/api/assets/${assetId}/photos`).set(world.auth('technician')).field('checklistItemId', '');
    expect(none.status).toBe(400);
    expect(Object.keys(none.body.error.details.fields)).toEqual(['photo']);
    const wrong = await request(t.app).post(`/api/assets/${assetId}/photos`).set(world.auth('technician')).attach('image', jpeg, 'a.jpg');
    expect(wrong.status).toBe(400);
    expect(Object.keys(wrong.body.error.details.fields)).toEqual(['photo']);
  });

  it('when the same upload is retried with the same Idempotency-Key, then the first photo answers again and only one is stored; other bytes under that key get 422', async () => {
    const key = `retry-${uid()}`;
    const first = await upload(world, assetId, jpeg, { key });
    const second = await upload(world, assetId, jpeg, { key });
    expect(first.status).toBe(201);
    expect(second.status).toBe(201);
    expect(second.body.id).toBe(first.body.id);
    expect(second.headers['idempotent-replayed']).toBe('true');
    const [rows] = (await t.sequelize.query(`SELECT count(*)::int AS n FROM photos WHERE idempotency_key = $1`, { bind: [key] })) as [Array<{ n: number }>, unknown];
    expect(rows[0].n).toBe(1);
    const other = await upload(world, assetId, await picture('png'), { key, filename: 'b.png' });
    expect(other.status).toBe(422);
    expect(other.body.error.code).toBe('upload/idempotency-key-reused');
  });

  it('when a photo names a checklist item of the asset, then the item lists it; an item of another asset is refused naming checklistItemId', async () => {
    const checklist = (await request(t.app).get(`/api/assets/${assetId}/checklist`).set(world.auth('technician'))).body as Checklist;
    const item = checklist.groups[0].items[0];
    const res = await upload(world, assetId, jpeg, { itemId: item.id });
    expect(res.status).toBe(201);
    expect(res.body.checklistItemId).toBe(item.id);
    const again = (await request(t.app).get(`/api/assets/${assetId}/checklist`).set(world.auth('technician'))).body as Checklist;
    expect(again.groups[0].items[0].photos.map((p) => p.id)).toContain(res.body.id);

    const otherAsset = await createAsset(t, world);
    const wrong = await upload(world, otherAsset.id, jpeg, { itemId: item.id });
    expect(wrong.status).toBe(400);
    expect(Object.keys(wrong.body.error.details.fields)).toEqual(['checklistItemId']);
  });

  it('when a driver of the program uploads a photo, then 201 and the asset shows it as its thumbnail', async () => {
    const asset = await createAsset(t, world);
    const res = await upload(world, asset.id, jpeg, { role: 'driver' });
    expect(res.status).toBe(201);
    const detail = await request(t.app).get(`/api/assets/${asset.id}`).set(world.auth('lead'));
    expect(detail.body.photos.map((p: { id: string }) => p.id)).toEqual([res.body.id]);
    expect(detail.body.thumbnailUrl).toBe(res.body.thumbnailUrl);
    const [rows] = (await t.sequelize.query(`SELECT action FROM history_entries WHERE entity_id = $1`, { bind: [res.body.id] })) as [Array<{ action: string }>, unknown];
    expect(rows.map((r) => r.action)).toEqual(['uploaded']);
  });
});

describe('reading photos', () => {
  let photoId: string;
  let url: string;
  beforeAll(async () => {
    const res = await upload(world, assetId, jpeg);
    photoId = res.body.id;
    url = res.body.url;
  });

  it('when a member of another program asks with a bearer token, then 404; with no credentials, then 401', async () => {
    const outsider = await makeWorld(t);
    expect((await request(t.app).get(`/api/photos/${photoId}`).set(outsider.auth('lead'))).status).toBe(404);
    expect((await request(t.app).get(`/api/photos/${photoId}`)).status).toBe(401);
  });

  it('when the signed URL is used without a bearer token, then the photo streams', async () => {
    expect(url).toMatch(new RegExp(`^/api/photos/${photoId}\\?exp=\\d+&sig=[A-Za-z0-9_-]+$`));
    const res = await request(t.app).get(url);
    expect(res.status).toBe(200);
    expect(Buffer.compare(res.body as Buffer, jpeg)).toBe(0);
  });

  it.each([
    ['a tampered signature', (u: string) => u.replace(/sig=(.)/, (_m, c: string) => `sig=${c === 'A' ? 'B' : 'A'}`)],
    ['a later expiry', (u: string) => u.replace(/exp=(\d+)/, (_m, e: string) => `exp=${Number(e) + 3600}`)],
    ['the original\'s signature used for the thumbnail', (u: string) => `${u}&size=thumb`],
    ['another photo\'s id', (u: string) => u.replace(/photos\/[0-9a-f-]+/, 'photos/00000000-0000-4000-8000-000000000000')],
  ])('when a signed URL carries %s, then 401', async (_label, tamper) => {
    const res = await request(t.app).get(tamper(url));
    expect(res.status).toBe(401);
    expect(res.body.error.code).toBe('photo/link-invalid');
  });

  it('when a signed URL has expired, then 401', async () => {
    const expired = signedPhotoUrl(t.deps, photoId, 'original', Date.now() - 3 * 3600 * 1000);
    const res = await request(t.app).get(expired);
    expect(res.status).toBe(401);
  });
});

async function photoCount(id: string) {
  const [rows] = (await t.sequelize.query(`SELECT count(*)::int AS n FROM photos WHERE asset_id = $1`, { bind: [id] })) as [Array<{ n: number }>, unknown];
  return rows[0].n;
}
