import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import crypto from 'node:crypto';
import jwt from 'jsonwebtoken';
import request from 'supertest';
import sharp from 'sharp';
import { createApp } from '../../server/app';
import { signToken } from '../../server/middleware/auth';
import { DEMO_PASSWORD } from '../../server/db/demo/seed';
import { PHOTO_MAX_BYTES, PHOTO_MAX_PIXELS } from '../../shared/schemas/assets';
import { makeTestApp, makeUser, makeProgram } from '../helpers/test-app';
import { makeFindingWorld, muteFindingMail, fileFinding, type FindingWorld } from '../helpers/findings';

const t = makeTestApp();
afterAll(() => t.close());
const ROOT = path.resolve(__dirname, '../..');

/**
 * Tokens. tests/server/auth.test.ts already covers: no token, a bad signature, another secret,
 * HS512, `none`, an expired token and a deactivated user (401 each). Here only what it leaves out.
 */
describe('tokens', () => {
  const me = (authorization: string) => request(t.app).get('/api/me').set('Authorization', authorization);
  let user: Awaited<ReturnType<typeof makeUser>>;
  beforeAll(async () => {
    user = await makeUser({ role: 'technician', programIds: [(await makeProgram()).id] });
  });
  const secret = () => t.deps.config.jwt.secret;

  it('when the signed token is good, then 200 (the baseline of the cases below)', async () => {
    expect((await me(`Bearer ${signToken(t.deps, user)}`)).status).toBe(200);
  });

  it.each([
    ['a user that does not exist', () => jwt.sign({ tv: 0 }, secret(), { subject: crypto.randomUUID(), algorithm: 'HS256', expiresIn: 60 })],
    ['a subject that is not an id', () => jwt.sign({ tv: 0 }, secret(), { subject: "' OR 1=1 --", algorithm: 'HS256', expiresIn: 60 })],
    ['no subject', () => jwt.sign({ tv: 0 }, secret(), { algorithm: 'HS256', expiresIn: 60 })],
    ['a stale token version (after a password change)', () => jwt.sign({ tv: user.tokenVersion + 1 }, secret(), { subject: user.id, algorithm: 'HS256', expiresIn: 60 })],
    ['a `none` header over a valid HS256 signature', () => {
      const good = signToken(t.deps, user).split('.');
      return [Buffer.from(JSON.stringify({ alg: 'none', typ: 'JWT' })).toString('base64url'), good[1], good[2]].join('.');
    }],
    ['a payload changed under a valid signature', () => {
      const good = signToken(t.deps, user).split('.');
      const payload = JSON.parse(Buffer.from(good[1], 'base64url').toString());
      return [good[0], Buffer.from(JSON.stringify({ ...payload, exp: payload.exp + 3600 })).toString('base64url'), good[2]].join('.');
    }],
    ['garbage', () => 'not.a.token'],
  ])('when the bearer token has %s, then 401', async (_label, make) => {
    const res = await me(`Bearer ${make()}`);
    expect(res.status).toBe(401);
    expect(res.body.error.code).toBe('auth/unauthenticated');
  });

  it('when a good token comes with another scheme, then 401', async () => {
    expect((await me(`Basic ${signToken(t.deps, user)}`)).status).toBe(401);
    expect((await me(signToken(t.deps, user))).status).toBe(401);
  });
});

describe('security headers', () => {
  let webDist: string;
  beforeAll(() => {
    webDist = fs.mkdtempSync(path.join(os.tmpdir(), 'proofyard-web-'));
    fs.writeFileSync(path.join(webDist, 'index.html'), '<!doctype html><html><body><div id="root"></div></body></html>');
  });
  afterAll(() => fs.rmSync(webDist, { recursive: true, force: true }));

  const expectHeaders = (res: request.Response) => {
    const csp = String(res.headers['content-security-policy']);
    expect(csp).toContain("default-src 'self'");
    expect(csp).toContain("frame-ancestors 'none'");
    expect(csp).toContain("object-src 'none'");
    expect(csp).toMatch(/script-src 'self'(;|$)/);
    expect(res.headers['x-content-type-options']).toBe('nosniff');
    expect(res.headers['x-frame-options']).toBeDefined();
    expect(res.headers['x-powered-by']).toBeUndefined();
  };

  it('when an API route answers (even an error), then helmet headers are set', async () => {
    expectHeaders(await request(t.app).get('/api/health'));
    expectHeaders(await request(t.app).get('/api/me'));
  });

  it('when the web index is served, then it carries the same headers', async () => {
    const { app } = createApp(t.deps, { webDist });
    for (const url of ['/', '/assets/some-deep-link']) {
      const res = await request(app).get(url);
      expect(res.status).toBe(200);
      expect(res.text).toContain('id="root"');
      expectHeaders(res);
    }
  });
});

describe('no secret in the web bundle', () => {
  const CLIENT_DIRS = ['app', 'components', 'hooks', 'shared'];
  const SECRETS = () => [process.env.JWT_SECRET, t.deps.config.jwt.secret, 'S3RVER', 'proofyard:proofyard', 'BEGIN PRIVATE KEY', DEMO_PASSWORD].filter((s): s is string => !!s);
  const walk = (dir: string, exts: RegExp): string[] =>
    fs.existsSync(dir)
      ? fs.readdirSync(dir, { withFileTypes: true }).flatMap((e) => {
          const full = path.join(dir, e.name);
          if (e.isDirectory()) return e.name === 'node_modules' ? [] : walk(full, exts);
          return exts.test(e.name) ? [full] : [];
        })
      : [];

  it('when the client source that goes into the bundle is read, then it imports no server code, reads no private env and holds no secret', () => {
    const files = CLIENT_DIRS.flatMap((d) => walk(path.join(ROOT, d), /\.(ts|tsx|js|jsx|json)$/));
    expect(files.length).toBeGreaterThan(20);
    const problems: string[] = [];
    for (const file of files) {
      const text = fs.readFileSync(file, 'utf8');
      const rel = path.relative(ROOT, file);
      if (/(from\s+|require\(\s*|import\(\s*)['"](\.\.\/)+server\//.test(text) || /['"]@\/server\//.test(text)) problems.push(`${rel} imports server code`);
      for (const m of text.matchAll(/process\.env(?:\.([A-Za-z_][A-Za-z0-9_]*)|\[)/g)) {
        if (!m[1] || !m[1].startsWith('EXPO_PUBLIC_')) problems.push(`${rel} reads process.env${m[1] ? `.${m[1]}` : '[...]'}`);
      }
      for (const secret of SECRETS()) if (text.includes(secret)) problems.push(`${rel} holds the secret ${secret.slice(0, 6)}...`);
    }
    expect(problems).toEqual([]);
  });

  it('when a web build exists in dist/, then none of its scripts holds a secret', () => {
    const bundles = walk(process.env.WEB_DIST ? path.resolve(process.env.WEB_DIST) : path.join(ROOT, 'dist'), /\.(js|html|json|map)$/);
    // The build is made by `npm test` before the browser tests: in the unit phase there may be none.
    const problems: string[] = [];
    for (const file of bundles) {
      const text = fs.readFileSync(file, 'utf8');
      for (const secret of SECRETS()) if (text.includes(secret)) problems.push(`${path.relative(ROOT, file)} holds ${secret.slice(0, 6)}...`);
    }
    expect(problems).toEqual([]);
  });
});

/** A PNG whose header declares width x height over a tiny real image (the IHDR is rewritten, its CRC recomputed). */
async function pngDeclaring(width: number, height: number): Promise<Buffer> {
  const png = Buffer.from(await sharp({ create: { width: 8, height: 8, channels: 3, background: '#336699' } }).png().toBuffer());
  // Signature (8) + length (4) + "IHDR" (4) + width (4) + height (4) ...; the CRC covers type and data (17 bytes).
  png.writeUInt32BE(width, 16);
  png.writeUInt32BE(height, 20);
  png.writeUInt32BE(crc32(png.subarray(12, 29)), 29);
  return png;
}
function crc32(buf: Buffer): number {
  let c = ~0;
  for (const byte of buf) {
    c ^= byte;
    for (let k = 0; k < 8; k += 1) c = c & 1 ? (c >>> 1) ^ 0xedb88320 : c >>> 1;
  }
  return ~c >>> 0;
}

describe('uploads', () => {
  let world: FindingWorld;
  let findingId: string;
  beforeAll(async () => {
    world = await makeFindingWorld(t);
    await muteFindingMail(t, world);
    findingId = (await fileFinding(t, world)).id;
  });
  const targets = () => [
    ['asset', `/api/assets/${world.asset.id}/photos`],
    ['finding', `/api/findings/${findingId}/photos`],
  ];
  const photoCount = async () => {
    const [rows] = (await t.sequelize.query(`SELECT count(*)::int AS n FROM photos WHERE asset_id = $1`, { bind: [world.asset.id] })) as [Array<{ n: number }>, unknown];
    return rows[0].n;
  };
  const upload = (url: string, bytes: Buffer, name: string, contentType = 'image/jpeg') =>
    request(t.app).post(url).set(world.auth('technician')).attach('photo', bytes, { filename: name, contentType });

  it('when a good photo is sent to each route, then it is taken (the baseline of the refusals)', async () => {
    const jpeg = await sharp({ create: { width: 40, height: 30, channels: 3, background: '#888888' } }).jpeg().toBuffer();
    for (const [, url] of targets()) expect((await upload(url, jpeg, 'ok.jpg')).status).toBe(201);
  });

  it('when the bytes are not an image but the name says .jpg, then 415 naming the field, and nothing is stored', async () => {
    const before = await photoCount();
    const fakes = [Buffer.from('%PDF-1.7\n1 0 obj <<>> endobj\n'), Buffer.from('<svg xmlns="http://www.w3.org/2000/svg"><script>alert(1)</script></svg>'), crypto.randomBytes(4096)];
    for (const [, url] of targets()) {
      for (const bytes of fakes) {
        const res = await upload(url, bytes, 'holiday.jpg');
        expect({ url, status: res.status, code: res.body.error?.code }).toEqual({ url, status: 415, code: 'upload/unsupported-type' });
        expect(res.body.error.details.fields.photo).toBeTruthy();
      }
    }
    expect(await photoCount()).toBe(before);
  });

  it('when the file is larger than the limit, then 413 with the reason, and nothing is stored', async () => {
    const before = await photoCount();
    const big = Buffer.alloc(PHOTO_MAX_BYTES + 1024, 0xff);
    for (const [, url] of targets()) {
      const res = await upload(url, big, 'big.jpg');
      expect({ url, status: res.status }).toEqual({ url, status: 413 });
      expect(res.body.error.message).toMatch(/larger than|too large/i);
    }
    expect(await photoCount()).toBe(before);
  });

  it('when an image declares far more pixels than sane (20000 x 20000, small on disk), then it is refused with the reason', async () => {
    const before = await photoCount();
    const bomb = await pngDeclaring(20_000, 20_000);
    expect(bomb.length).toBeLessThan(10_000);
    expect((await sharp(bomb, { limitInputPixels: false }).metadata()).width).toBe(20_000);
    expect(20_000 * 20_000).toBeGreaterThan(PHOTO_MAX_PIXELS);
    for (const [, url] of targets()) {
      const res = await upload(url, bomb, 'bomb.png', 'image/png');
      expect({ url, refused: [413, 422].includes(res.status) }).toEqual({ url, refused: true });
      expect(res.body.error.message).toMatch(/pixels/i);
      expect(res.body.error.details.fields.photo).toBeTruthy();
    }
    expect(await photoCount()).toBe(before);
  });
});
