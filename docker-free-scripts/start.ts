// `npm start`: PostgreSQL on loopback in the project's own folder, migrations, demo data when the
// database is empty, the S3 and SMTP fakes, the web build, and one Express process for web and API.
import crypto from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import type { ChildProcess } from 'node:child_process';
import { ConfigError, parseConfig, DEFAULT_PGPORT } from '../server/config/env';
import { createSequelize } from '../server/db/sequelize';
import { initModels } from '../server/db/models';
import { migrateUp } from '../server/db/migrate';
import { DEMO_PASSWORD, DEMO_SIGN_INS, databaseIsEmpty, seedDemo } from '../server/db/demo/seed';
import { clusterDirFor, ensureDatabase, startCluster, type Cluster } from './lib/postgres';
import { ROOT, startFakes, startTs, stopChild } from './lib/services';
import { buildWeb } from './lib/web-build';
import { waitForPort } from './lib/ports';

const children: ChildProcess[] = [];
let cluster: Cluster | undefined;
let stopping = false;

function stopAll(code = 0) {
  if (stopping) return;
  stopping = true;
  console.log('\nproofyard: stopping...');
  for (const c of children.reverse()) stopChild(c);
  setTimeout(() => {
    cluster?.stop();
    console.log('proofyard: stopped. Your data stays in the cluster for the next start.');
    process.exit(code);
  }, 800);
}

async function main() {
  const env = { ...process.env } as Record<string, string>;
  const dataRoot = path.join(ROOT, '.data');
  fs.mkdirSync(dataRoot, { recursive: true });

  // A JWT secret of this machine's own, kept beside the data, unless one is given.
  if (!env.JWT_SECRET) {
    const file = path.join(dataRoot, 'jwt-secret');
    if (!fs.existsSync(file)) fs.writeFileSync(file, crypto.randomBytes(48).toString('base64url'), { mode: 0o600 });
    env.JWT_SECRET = fs.readFileSync(file, 'utf8').trim();
  }
  const localPostgres = !env.DATABASE_URL;
  const localS3 = !env.S3_ENDPOINT;
  const localSmtp = !env.SMTP_URL;
  const s3Port = Number(env.S3_FAKE_PORT ?? 54330);
  const smtpPort = Number(env.SMTP_FAKE_PORT ?? 54325);
  const smtpHttpPort = Number(env.SMTP_FAKE_HTTP_PORT ?? 54331);
  if (localS3) env.S3_ENDPOINT = `http://127.0.0.1:${s3Port}`;
  if (localSmtp) {
    env.SMTP_URL = `smtp://127.0.0.1:${smtpPort}`;
    env.DEV_INBOX_URL = `http://127.0.0.1:${smtpHttpPort}`;
  }

  let config;
  try {
    config = parseConfig(env);
  } catch (err) {
    if (err instanceof ConfigError) {
      console.error(err.message);
      process.exit(2);
    }
    throw err;
  }

  process.on('SIGINT', () => stopAll(0));
  process.on('SIGTERM', () => stopAll(0));

  if (localPostgres) {
    const pgPort = Number(env.PGPORT ?? DEFAULT_PGPORT);
    const dataDir = clusterDirFor(ROOT, 'pg');
    console.log(`proofyard: PostgreSQL on 127.0.0.1:${pgPort} (data in ${dataDir})`);
    cluster = await startCluster({ dataDir, port: pgPort, durable: true });
    await ensureDatabase(cluster.url('postgres'), 'proofyard');
  }

  // The fakes start before the demo data: the demo's photos go to the S3 fake.
  if (localS3 || localSmtp) {
    const fakes = await startFakes({
      s3Port,
      smtpPort,
      smtpHttpPort,
      dataDir: dataRoot,
      bucket: config.s3.bucket,
      quiet: true,
    });
    children.push(fakes.s3, fakes.smtp);
  }

  const sequelize = createSequelize(config.databaseUrl);
  initModels(sequelize);
  const applied = await migrateUp(sequelize);
  if (applied.length) console.log(`proofyard: applied ${applied.length} migration(s)`);
  if (await databaseIsEmpty(sequelize)) {
    console.log('proofyard: loading the demo data (first start)...');
    await seedDemo(sequelize, config);
  } else {
    console.log('proofyard: database has data; demo data not reloaded');
  }
  await sequelize.close();

  buildWeb();

  const server = startTs('server/index.ts', env);
  children.push(server);
  server.on('exit', (code) => {
    if (!stopping) {
      console.error(`proofyard: the server stopped (exit ${code})`);
      stopAll(1);
    }
  });
  await waitForPort(config.port, 30_000);

  console.log(`
Proofyard is running: ${config.publicUrl}
${localSmtp ? `Dev inbox (e-mail the product sent): ${config.publicUrl}/dev/inbox\n` : ''}
Demo sign-ins (password: ${DEMO_PASSWORD}):
${DEMO_SIGN_INS.map((d) => `  ${d.email.padEnd(32)} ${d.role.padEnd(12)} ${d.program}`).join('\n')}

Press Ctrl-C to stop. Data stays for the next start.
`);
}

main().catch((err) => {
  console.error(`proofyard: ${err instanceof Error ? err.message : String(err)}`);
  stopAll(1);
});
