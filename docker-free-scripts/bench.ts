// `npm run bench`: prepares its own data in a throwaway PostgreSQL cluster (never the user's),
// then measures side by side in one run: first-load JavaScript against an empty Expo Router app,
// Lighthouse on the signed-in asset list, API endpoints against their bare SQL with statement
// counts at 50 and 5,000 assets, a read/write load, and the photo bytes sent. Prints the table
// and writes bench-results/latest.md and latest.json. BENCH_QUICK=1 for fewer runs and a 10 s
// load; BENCH_LOAD_SECONDS sets the load's duration. BENCH_ONLY=api measures only the API part
// (no web build, Lighthouse, load or photos; written to bench-results/api-only/), and
// BENCH_ENDPOINTS=<regular expression> narrows it to the endpoints whose name matches (for
// example BENCH_ENDPOINTS=roll-up). Everything listens on 127.0.0.1 only.
import { spawnSync, type ChildProcess } from 'node:child_process';
import crypto from 'node:crypto';
import fs from 'node:fs';
import type { Server } from 'node:http';
import os from 'node:os';
import path from 'node:path';
import compression from 'compression';
import express from 'express';
import { QueryTypes, type Sequelize } from 'sequelize';
import { parseConfig } from '../server/config/env';
import { createSequelize } from '../server/db/sequelize';
import { initModels } from '../server/db/models';
import { migrateUp } from '../server/db/migrate';
import { createMailer } from '../server/integrations/mailer';
import { createStorage } from '../server/integrations/storage';
import { PROGRAM_KEY, TOKEN_KEY } from '../hooks/api/session-store';
import { ensureDatabase, pgBinDir, startCluster, type Cluster } from './lib/postgres';
import { freePort, waitForPort } from './lib/ports';
import { ROOT, startFakes, startTs, stopChild } from './lib/services';
import { buildWeb } from './lib/web-build';
import { discoverEndpoints, measureApi, startInProcess } from './bench/api';
import { log, QUICK, withTimeout } from './bench/common';
import { runLighthouse } from './bench/lighthouse';
import { loadSeconds, runLoad } from './bench/load';
import { measurePhoto } from './bench/photos';
import { writeResults, type Results } from './bench/report';
import { generateScaleData } from './bench/scale-data';
import { buildEmptyApp, firstLoadJs } from './bench/web-size';

/** BENCH_ONLY: a comma-separated list of parts to run (web, api, lighthouse, load, photos); all when unset. */
const ONLY = new Set((process.env.BENCH_ONLY ?? '').split(',').map((s) => s.trim().toLowerCase()).filter(Boolean));
const runs = (partName: 'web' | 'api' | 'lighthouse' | 'load' | 'photos') => ONLY.size === 0 || ONLY.has(partName);
/** BENCH_ENDPOINTS: a regular expression the measured endpoints' names must match. */
const ENDPOINT_FILTER = process.env.BENCH_ENDPOINTS ? new RegExp(process.env.BENCH_ENDPOINTS, 'i') : null;

/** The whole run is bounded: past this, everything started here is stopped. */
const WATCHDOG_MS = 40 * 60_000;

const children: ChildProcess[] = [];
const servers: Server[] = [];
let cluster: Cluster | undefined;
let tmpRoot: string | undefined;

function cleanup() {
  for (const s of servers) s.close();
  for (const c of children) stopChild(c);
  cluster?.stop();
  if (tmpRoot) fs.rmSync(tmpRoot, { recursive: true, force: true });
}

async function signIn(base: string, email: string, password: string): Promise<string> {
  const res = await fetch(`${base}/api/auth/sign-in`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ email, password }) });
  if (res.status !== 200) throw new Error(`sign-in of ${email} answered ${res.status}: ${await res.text()}`);
  return ((await res.json()) as { token: string }).token;
}

function postgresVersion(): string {
  const res = spawnSync(path.join(pgBinDir(), 'postgres'), ['--version'], { encoding: 'utf8' });
  return (res.stdout ?? '').trim().replace(/^postgres \(PostgreSQL\) /, 'PostgreSQL ') || 'PostgreSQL';
}

/** Serves an exported web app as the product's server does it (compressed, index.html fallback), for the floor's Lighthouse run. */
async function serveStatic(dir: string): Promise<string> {
  const app = express();
  app.use(compression());
  app.use(express.static(dir, { index: false }));
  app.get('/{*splat}', (_req, res) => res.sendFile(path.join(dir, 'index.html')));
  const port = await freePort();
  await new Promise<void>((resolve) => servers.push(app.listen(port, '127.0.0.1', () => resolve())));
  return `http://127.0.0.1:${port}`;
}

/** Runs one part of the bench; a failure is reported in the table and the other parts still run. */
async function part<T>(results: Results, [short, name]: [string, string], work: () => Promise<T>): Promise<T | undefined> {
  const started = Date.now();
  results.loadAverage[short] = os.loadavg()[0];
  log(`${name}...`);
  try {
    const value = await work();
    log(`${name}: done in ${((Date.now() - started) / 1000).toFixed(1)} s`);
    return value;
  } catch (err) {
    const message = err instanceof Error ? err.message : String(err);
    log(`${name}: FAILED: ${message}`);
    results.failures.push(`${name}: ${message.split('\n')[0]}`);
    return undefined;
  }
}

async function main() {
  const unknownParts = [...ONLY].filter((p) => !['web', 'api', 'lighthouse', 'load', 'photos'].includes(p));
  if (unknownParts.length) throw new Error(`BENCH_ONLY: unknown part ${unknownParts.join(', ')} (choose from web, api, lighthouse, load, photos)`);
  const started = Date.now();
  const results: Results = {
    startedAt: new Date().toISOString(),
    seconds: 0,
    quick: QUICK,
    machine: { cpus: os.cpus().length, loadAverageAtStart: os.loadavg(), node: process.versions.node, postgres: postgresVersion() },
    loadAverage: {},
    notes: [],
    failures: [],
  };

  tmpRoot = fs.mkdtempSync(path.join(os.tmpdir(), 'proofyard-bench-'));
  fs.chmodSync(tmpRoot, 0o755);
  const [pgPort, s3Port, smtpPort, smtpHttpPort, appPort] = await Promise.all([freePort(), freePort(), freePort(), freePort(), freePort()]);
  log(`throwaway PostgreSQL on 127.0.0.1:${pgPort} in ${tmpRoot} (your own database is not touched)`);
  cluster = await startCluster({ dataDir: path.join(tmpRoot, 'pg'), port: pgPort, durable: false });
  await ensureDatabase(cluster.url('postgres'), 'proofyard_bench', { recreate: true });
  const databaseUrl = cluster.url('proofyard_bench');
  const fakes = await startFakes({ s3Port, smtpPort, smtpHttpPort, dataDir: tmpRoot, bucket: 'proofyard-bench', quiet: true });
  children.push(fakes.s3, fakes.smtp);

  const webDist = path.join(tmpRoot, 'web-dist');
  const env: Record<string, string> = {
    NODE_ENV: 'production',
    DATABASE_URL: databaseUrl,
    JWT_SECRET: crypto.randomBytes(32).toString('hex'),
    BCRYPT_ROUNDS: '11',
    S3_ENDPOINT: `http://127.0.0.1:${s3Port}`,
    S3_BUCKET: 'proofyard-bench',
    SMTP_URL: `smtp://127.0.0.1:${smtpPort}`,
    PORT: String(appPort),
    PUBLIC_URL: `http://127.0.0.1:${appPort}`,
    WEB_DIST: webDist,
    AWS_SDK_JS_NODE_VERSION_SUPPORT_WARNING_DISABLED: 'true',
  };
  const config = parseConfig(env);

  // 1. Scale data.
  const sequelize: Sequelize = createSequelize(databaseUrl);
  initModels(sequelize);
  const scale = await part(results, ['scale data', 'migrate and generate the scale data'], async () => {
    await migrateUp(sequelize);
    return generateScaleData(sequelize, { bcryptRounds: config.bcryptRounds });
  });
  if (!scale) throw new Error('no scale data: nothing else can be measured');
  results.scale = scale;
  for (const line of scale.skipped) log(line);
  log(`scale data: ${Object.entries(scale.counts).map(([k, v]) => `${k} ${v}`).join(', ')}`);

  // 2. Web: the project's export (reused when dist/ is current) copied aside, and an empty app.
  if (runs('web')) await part(results, ['web', 'web first-load JavaScript (project and empty Expo Router app)'], async () => {
    buildWeb();
    fs.cpSync(path.join(ROOT, 'dist'), webDist, { recursive: true });
    const app = firstLoadJs(webDist);
    const empty = firstLoadJs(buildEmptyApp(path.join(tmpRoot!, 'empty-app')));
    results.web = { app, empty, ratio: app.gzip / empty.gzip };
  });
  if (runs('web')) results.notes.push(
    'Web: the scripts dist/index.html loads (script tags and script preloads) after `expo export --platform web`, gzipped at zlib\'s default level as the server\'s compression middleware sends them; the floor is an empty Expo Router app (root layout with <Slot/>, one screen with a Text, the project\'s web.output) exported in the same run from the same node_modules.',
  );

  // The server, as `npm start` runs it, on the bench database.
  const server = startTs('server/index.ts', env, { quiet: true });
  children.push(server);
  await waitForPort(appPort, 30_000);
  const base = `http://127.0.0.1:${appPort}`;
  const leadToken = await signIn(base, scale.emails.lead, scale.password);
  const techToken = await signIn(base, scale.emails.technician, scale.password);
  const targetOf = (p: typeof scale.big) => ({ programId: p.id, assetId: p.sampleAssetId, stageId: p.stageIds[1] ?? p.stageIds[0] });

  // 4. API against bare SQL, and statements per request.
  if (runs('api')) await part(results, ['API', 'API endpoints against bare SQL'], async () => {
    const deps = {
      config,
      sequelize,
      mailer: createMailer(config.mail.smtpUrl, config.mail.from),
      storage: createStorage(config.s3),
      log: (err: unknown) => console.error('[bench in-process app]', err),
    };
    const inProcess = await startInProcess(deps);
    try {
      const discovered = discoverEndpoints(inProcess.routes);
      const endpoints = ENDPOINT_FILTER ? discovered.endpoints.filter((e) => ENDPOINT_FILTER.test(e.name)) : discovered.endpoints;
      const notes = ENDPOINT_FILTER ? [...discovered.notes, `only the endpoints matching BENCH_ENDPOINTS=${process.env.BENCH_ENDPOINTS}: ${endpoints.map((e) => e.name).join(', ') || 'none'}`] : discovered.notes;
      for (const n of notes) log(n);
      results.notes.push(...notes);
      results.api = await measureApi({ endpoints, inProcess, serverBase: base, databaseUrl, token: leadToken, big: targetOf(scale.big), small: targetOf(scale.small) });
    } finally {
      await inProcess.close();
      deps.storage.close();
    }
  });
  if (runs('api')) results.notes.push(
    `API: statements captured by wrapping pg's Client#query in an app built with createApp on the same database (the fewest of three requests, so a pool connection's set-up is not counted); endpoint time over HTTP (keep-alive) against the started server, bare time replaying the same statements with the same binds on one pg connection, one after the other; the two are timed in turns (endpoint, then bare) after 3 unmeasured pairs, medians of up to ${QUICK ? 10 : 30} pairs (fewer when an endpoint's pairs pass 90 s), signed in as the lead.`,
  );

  // 3. Lighthouse on the signed-in asset list, and on the empty app for this machine's floor.
  const lhRuns = QUICK ? 1 : 3;
  if (runs('lighthouse')) await part(results, ['Lighthouse', 'Lighthouse (asset list, then the empty app)'], async () => {
    results.lighthouse = {};
    results.lighthouse.app = await runLighthouse({
      origin: base,
      route: '/assets',
      storage: { [TOKEN_KEY]: techToken, [PROGRAM_KEY]: scale.big.id },
      signedInRequest: /\/api\/assets\?/,
      runs: lhRuns,
      tmpDir: tmpRoot!,
      reportFile: path.join(ROOT, 'bench-results', 'lighthouse-asset-list.html'),
    });
    if (results.web) {
      const emptyOrigin = await serveStatic(path.join(tmpRoot!, 'empty-app', 'dist'));
      results.lighthouse.empty = await runLighthouse({
        origin: emptyOrigin,
        route: '/',
        storage: {},
        signedInRequest: /./,
        runs: lhRuns,
        tmpDir: tmpRoot!,
        reportFile: path.join(ROOT, 'bench-results', 'lighthouse-empty-app.html'),
      });
    }
  });
  if (runs('lighthouse')) results.notes.push(
    `Lighthouse ${results.lighthouse?.app?.lighthouse ?? ''}: mobile preset with its simulated throttling, performance only, the median of ${lhRuns} run${lhRuns === 1 ? '' : 's'} (Lighthouse's own median-run choice); Debian's Chromium with ${['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '...'].join(' ')}; signed in as the technician with the 5,000-asset program chosen, by writing the token into localStorage over CDP (playwright-core) before Lighthouse loads the page with a cleared HTTP cache. The median runs' reports: bench-results/lighthouse-asset-list.html and lighthouse-empty-app.html.`,
  );

  // 5. Load (after the measurements above: it writes).
  if (runs('load')) await part(results, ['load', `load (50 connections, ${loadSeconds()} s)`], async () => {
    const assets = await sequelize.query<{ id: string; version: number }>(
      `SELECT id, version FROM assets WHERE program_id = $1 ORDER BY md5(id::text) LIMIT 1000`,
      { bind: [scale.big.id], type: QueryTypes.SELECT },
    );
    results.load = await withTimeout(
      runLoad({ base, token: techToken, programId: scale.big.id, stageIds: scale.big.stageIds, assets }),
      (loadSeconds() + 60) * 1000,
      'the load run',
    );
  });
  if (results.load) results.notes.push(`Load: autocannon against the started server on loopback, signed in as the technician, ${results.load.mix}; the PATCH sends the version last seen for that asset, so a 409 is the product refusing a stale write. Status counts: ${JSON.stringify(results.load.statusCounts)}.`);

  // 6. Photos.
  if (runs('photos')) await part(results, ['photos', 'photo bytes'], async () => {
    results.photo = await measurePhoto();
  });
  if (runs('photos')) results.notes.push(
    'Photos: a 4000x3000 JPEG made with sharp (gradients with noise at three scales, quality 92), then the client\'s resize replayed server-side with sharp: long side PHOTO_CLIENT_LONG_SIDE, JPEG quality PHOTO_JPEG_QUALITY read from components/photos/prepare-photo.ts (the phone or browser does it with expo-image-manipulator; sharp stands in for it here).',
  );

  await sequelize.close();
  results.seconds = (Date.now() - started) / 1000;
  // A partial run is kept apart, so it never overwrites the figures of a full one.
  const outDir = ONLY.size ? path.join('bench-results', `${[...ONLY].sort().join('-')}-only`) : 'bench-results';
  if (ONLY.size) results.notes.unshift(`A partial run: only ${[...ONLY].join(', ')} (BENCH_ONLY).`);
  const md = writeResults(path.join(ROOT, outDir), results);
  console.log(`\n${md}`);
  console.log(`bench: written to ${outDir}/latest.md and ${outDir}/latest.json`);
  return results.failures.length ? 1 : 0;
}

const watchdog = setTimeout(() => {
  console.error(`bench: stopped after ${WATCHDOG_MS / 60_000} minutes`);
  cleanup();
  process.exit(1);
}, WATCHDOG_MS);
watchdog.unref();

process.on('SIGINT', () => {
  cleanup();
  process.exit(130);
});
process.on('SIGTERM', () => {
  cleanup();
  process.exit(143);
});

main()
  .then((code) => {
    cleanup();
    process.exit(code);
  })
  .catch((err) => {
    console.error(`bench: ${err instanceof Error ? err.stack : String(err)}`);
    cleanup();
    process.exit(1);
  });

