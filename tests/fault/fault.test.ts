import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import request from 'supertest';
import sharp from 'sharp';
import type { ChildProcess } from 'node:child_process';
import { ensureDatabase, startCluster, type Cluster } from '../../docker-free-scripts/lib/postgres';
import { freePort } from '../../docker-free-scripts/lib/ports';
import { startFakes, stopChild } from '../../docker-free-scripts/lib/services';
import { dumpDatabase, restoreDatabase } from '../../docker-free-scripts/lib/db-dump';
import { migrateUp } from '../../server/db/migrate';
import { dispatchOutbox } from '../../server/services/outbox';
import { makeTestApp } from '../helpers/test-app';
import { createAsset, makeWorld, type World } from '../helpers/assets';

/**
 * Faults with services of its own: a PostgreSQL cluster, an S3 fake and an SMTP fake that this
 * suite stops and starts, so that the other suites never see them go down.
 */
let tmp: string;
let cluster: Cluster;
let fakes: { s3: ChildProcess; smtp: ChildProcess };
let ports: { pg: number; s3: number; smtp: number; smtpHttp: number };
let t: ReturnType<typeof makeTestApp>;
let world: World;

async function stopFakes() {
  for (const c of [fakes.s3, fakes.smtp]) stopChild(c);
  await new Promise((r) => setTimeout(r, 600));
}

async function restartFakes() {
  fakes = await startFakes({ s3Port: ports.s3, smtpPort: ports.smtp, smtpHttpPort: ports.smtpHttp, dataDir: tmp, bucket: 'fault-test', quiet: true });
}

beforeAll(async () => {
  tmp = fs.mkdtempSync(path.join(os.tmpdir(), 'proofyard-fault-'));
  fs.chmodSync(tmp, 0o755);
  const [pg, s3, smtp, smtpHttp] = await Promise.all([freePort(), freePort(), freePort(), freePort()]);
  ports = { pg, s3, smtp, smtpHttp };
  cluster = await startCluster({ dataDir: path.join(tmp, 'pg'), port: pg, durable: true });
  await ensureDatabase(cluster.url('postgres'), 'fault');
  await restartFakes();
  t = makeTestApp({
    DATABASE_URL: cluster.url('fault'),
    S3_ENDPOINT: `http://127.0.0.1:${s3}`,
    S3_BUCKET: 'fault-test',
    SMTP_URL: `smtp://127.0.0.1:${smtp}`,
    DEV_INBOX_URL: `http://127.0.0.1:${smtpHttp}`,
  });
  await migrateUp(t.sequelize);
  world = await makeWorld(t);
}, 60_000);

afterAll(async () => {
  await t?.close();
  if (fakes) for (const c of [fakes.s3, fakes.smtp]) stopChild(c);
  cluster?.stop();
  fs.rmSync(tmp, { recursive: true, force: true });
});

async function waitForHealth(want: 'up' | 'down', timeoutMs = 20_000) {
  const until = Date.now() + timeoutMs;
  while (Date.now() < until) {
    const res = await request(t.app).get('/api/health');
    if (res.body.db === want) return res;
    await new Promise((r) => setTimeout(r, 250));
  }
  throw new Error(`health never said db ${want}`);
}

describe('PostgreSQL stopped during a run of writes', () => {
  it('when the database goes down and comes back, then writes answer 503 meanwhile, the API recovers by itself and every acknowledged write is kept', async () => {
    const asset = await createAsset(t, world);
    const acknowledged: string[] = [];
    const write = (n: number) =>
      request(t.app).post('/api/findings').set(world.auth('technician')).send({ assetId: asset.id, title: `Fault run write ${n}`, severity: 'minor' });

    for (let n = 0; n < 10; n += 1) {
      const res = await write(n);
      expect(res.status).toBe(201);
      acknowledged.push(res.body.id);
    }
    cluster.stop();
    const down = await write(100);
    expect(down.status).toBe(503);
    expect(down.body.error.message).toMatch(/cannot reach its database/);
    const health = await waitForHealth('down');
    expect(health.status).toBe(503);

    cluster = await startCluster({ dataDir: cluster.dataDir, port: ports.pg, durable: true });
    await waitForHealth('up');
    for (let n = 10; n < 20; n += 1) {
      let res = await write(n);
      // The first request after the restart may meet a pooled connection that died with the old server.
      if (res.status === 503) res = await write(n);
      expect(res.status).toBe(201);
      acknowledged.push(res.body.id);
    }
    const [rows] = (await t.sequelize.query('SELECT id FROM findings WHERE id IN (:ids)', { replacements: { ids: acknowledged } })) as [Array<{ id: string }>, unknown];
    expect(rows.map((r) => r.id).sort()).toEqual([...acknowledged].sort());
  }, 90_000);
});

describe('the S3 fake stopped', () => {
  it('when photo storage is down, then the upload fails with a clear message, the finding is saved, and the retry works once it is back', async () => {
    const asset = await createAsset(t, world);
    const jpeg = await sharp({ create: { width: 64, height: 48, channels: 3, background: '#446655' } }).jpeg().toBuffer();
    await stopFakes();

    const finding = await request(t.app).post('/api/findings').set(world.auth('technician')).send({ assetId: asset.id, title: 'Scuffed sill trim', severity: 'minor' });
    expect(finding.status).toBe(201);
    const key = 'fault-photo-retry-0001';
    const failed = await request(t.app).post(`/api/assets/${asset.id}/photos`).set(world.auth('technician')).set('Idempotency-Key', key).attach('photo', jpeg, 'trim.jpg');
    expect(failed.status).toBe(503);
    expect(failed.body.error.message).toMatch(/Photo storage cannot be reached/);

    await restartFakes();
    const retried = await request(t.app).post(`/api/assets/${asset.id}/photos`).set(world.auth('technician')).set('Idempotency-Key', key).attach('photo', jpeg, 'trim.jpg');
    expect(retried.status).toBe(201);
    const [photos] = (await t.sequelize.query('SELECT count(*)::int AS n FROM photos WHERE asset_id = $1', { bind: [asset.id] })) as [Array<{ n: number }>, unknown];
    expect(photos[0].n).toBe(1);
  }, 60_000);
});

describe('the SMTP fake stopped', () => {
  it('when mail cannot be delivered, then it stays in the outbox and is delivered once the server is back', async () => {
    await stopFakes();
    const user = world.users.engineer;
    const ask = await request(t.app).post('/api/auth/forgot-password').send({ email: user.email });
    expect(ask.status).toBe(202);
    const first = await dispatchOutbox(t.deps);
    expect(first.failed).toBeGreaterThanOrEqual(1);
    const [pending] = (await t.sequelize.query(`SELECT status, attempts FROM outbox_messages WHERE to_address = $1`, { bind: [user.email] })) as [Array<{ status: string; attempts: number }>, unknown];
    expect(pending).toEqual([{ status: 'pending', attempts: 1 }]);

    await restartFakes();
    await t.sequelize.query(`UPDATE outbox_messages SET next_attempt_at = now() WHERE status = 'pending'`);
    const second = await dispatchOutbox(t.deps);
    expect(second.sent).toBeGreaterThanOrEqual(1);
    const inbox = (await (await fetch(`http://127.0.0.1:${ports.smtpHttp}/messages`)).json()) as { messages: Array<{ to: string; subject: string }> };
    expect(inbox.messages.filter((m) => m.to.includes(user.email) && m.subject.includes('Reset'))).toHaveLength(1);
  }, 60_000);
});

describe('db:backup and db:restore', () => {
  async function fingerprint() {
    const [tables] = (await t.sequelize.query(
      `SELECT tablename FROM pg_tables WHERE schemaname = 'public' ORDER BY tablename`,
    )) as [Array<{ tablename: string }>, unknown];
    const out: Record<string, { rows: number; checksum: string }> = {};
    for (const { tablename } of tables) {
      const [rows] = (await t.sequelize.query(
        `SELECT count(*)::int AS rows, md5(coalesce(string_agg(x::text, '|' ORDER BY x::text), '')) AS checksum FROM "${tablename}" x`,
      )) as [Array<{ rows: number; checksum: string }>, unknown];
      out[tablename] = rows[0];
    }
    return out;
  }

  it('when the database is backed up, changed and restored, then every table has the same rows and checksum', async () => {
    await createAsset(t, world);
    const before = await fingerprint();
    expect(before.findings.rows).toBeGreaterThan(0);
    const file = path.join(tmp, 'backup.dump');
    dumpDatabase(cluster.url('fault'), file);

    await createAsset(t, world);
    await t.sequelize.query(`DELETE FROM findings WHERE title LIKE 'Fault run write 1%'`);
    expect(await fingerprint()).not.toEqual(before);

    await t.sequelize.close();
    restoreDatabase(cluster.url('fault'), file);
    t = makeTestApp({ DATABASE_URL: cluster.url('fault'), S3_ENDPOINT: `http://127.0.0.1:${ports.s3}`, S3_BUCKET: 'fault-test', SMTP_URL: `smtp://127.0.0.1:${ports.smtp}` });
    expect(await fingerprint()).toEqual(before);
  }, 60_000);
});
