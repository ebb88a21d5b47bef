// `npm test`: lint, typecheck, then every test (shared, server, client, browser) against a
// throwaway PostgreSQL cluster and fresh S3/SMTP fakes on free loopback ports.
import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import crypto from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { ensureDatabase, startCluster, type Cluster } from './lib/postgres';
import { freePort, waitForPort } from './lib/ports';
import { ROOT, startFakes, startTs, stopChild } from './lib/services';
import { buildWeb, webDistDir } from './lib/web-build';

const children: ChildProcess[] = [];
let cluster: Cluster | undefined;
let tmpRoot: string | undefined;

function cleanup() {
  for (const c of children) stopChild(c);
  cluster?.stop();
  if (tmpRoot) fs.rmSync(tmpRoot, { recursive: true, force: true });
}

function step(name: string, cmd: string, args: string[], env: Record<string, string> = {}) {
  console.log(`\n== ${name}`);
  const started = Date.now();
  const res = spawnSync(cmd, args, { cwd: ROOT, stdio: 'inherit', env: { ...process.env, ...env } });
  console.log(`== ${name}: ${res.status === 0 ? 'ok' : 'FAILED'} in ${((Date.now() - started) / 1000).toFixed(1)} s`);
  return res.status === 0;
}

async function main() {
  const bin = (name: string) => path.join(ROOT, 'node_modules', '.bin', name);
  const args = process.argv.slice(2);
  const only = args.find((a) => a.startsWith('--only='))?.slice(7);
  // Anything else narrows the jest run to matching test files (e.g. `npm test -- --only=server matrix`).
  const patterns = args.filter((a) => !a.startsWith('--only='));
  let ok = true;

  if (!only) {
    ok = step('lint (eslint)', bin('eslint'), ['.', '--max-warnings=0']) && ok;
    ok = step('typecheck (tsc)', bin('tsc'), ['--noEmit', '-p', '.']) && ok;
  }

  tmpRoot = fs.mkdtempSync(path.join(os.tmpdir(), 'proofyard-test-'));
  fs.chmodSync(tmpRoot, 0o755);
  const [pgPort, s3Port, smtpPort, smtpHttpPort, appPort] = await Promise.all([freePort(), freePort(), freePort(), freePort(), freePort()]);
  console.log(`\n== services: throwaway PostgreSQL on 127.0.0.1:${pgPort}, S3 fake ${s3Port}, SMTP fake ${smtpPort}`);
  // A throwaway cluster: fsync off for speed (its data is discarded after the run).
  cluster = await startCluster({ dataDir: path.join(tmpRoot, 'pg'), port: pgPort, durable: false });
  await ensureDatabase(cluster.url('postgres'), 'proofyard_test', { recreate: true });
  const fakes = await startFakes({ s3Port, smtpPort, smtpHttpPort, dataDir: tmpRoot, bucket: 'proofyard-test', quiet: true });
  children.push(fakes.s3, fakes.smtp);

  const testEnv: Record<string, string> = {
    NODE_ENV: 'test',
    DATABASE_URL: cluster.url('proofyard_test'),
    PG_ADMIN_URL: cluster.url('postgres'),
    PG_DATA_DIR: cluster.dataDir,
    JWT_SECRET: crypto.randomBytes(32).toString('hex'),
    BCRYPT_ROUNDS: '11',
    S3_ENDPOINT: `http://127.0.0.1:${s3Port}`,
    S3_BUCKET: 'proofyard-test',
    SMTP_URL: `smtp://127.0.0.1:${smtpPort}`,
    DEV_INBOX_URL: `http://127.0.0.1:${smtpHttpPort}`,
    PORT: String(appPort),
    PUBLIC_URL: `http://127.0.0.1:${appPort}`,
    TEST_ARTIFACTS: process.env.TEST_ARTIFACTS ?? path.join(ROOT, 'test-artifacts'),
    WEB_DIST: webDistDir(),
    AWS_SDK_JS_NODE_VERSION_SUPPORT_WARNING_DISABLED: 'true',
  };
  // Migrate and seed the demo data once; tests make their own rows beside it.
  ok = step('migrate + demo data', process.execPath, ['--import', 'tsx', 'docker-free-scripts/prepare-test-db.ts'], testEnv) && ok;

  const jestOut = path.join(tmpRoot, 'jest.json');
  const unitProjects = ['shared', 'server', 'client'];
  const selected = only ? only.split(',') : unitProjects;
  const unit = selected.filter((p) => p !== 'e2e' && p !== 'fault');
  if (unit.length) {
    ok = step('unit and API tests (jest)', bin('jest'), ['--selectProjects', ...unit, '--ci', '--json', `--outputFile=${jestOut}`, ...patterns], testEnv) && ok;
  }
  const totals = { passed: 0, failed: 0 };
  const addTotals = (file: string) => {
    if (!fs.existsSync(file)) return;
    const r = JSON.parse(fs.readFileSync(file, 'utf8'));
    totals.passed += r.numPassedTests;
    totals.failed += r.numFailedTests + (r.numRuntimeErrorTestSuites ?? 0);
  };
  addTotals(jestOut);

  if (!only || selected.includes('fault')) {
    // The fault suite stops and starts services of its own, one test at a time.
    const faultOut = path.join(tmpRoot, 'fault.json');
    ok = step('fault suite (jest)', bin('jest'), ['--selectProjects', 'fault', '--ci', '--runInBand', '--forceExit', '--json', `--outputFile=${faultOut}`, ...patterns], testEnv) && ok;
    addTotals(faultOut);
  }

  if (!only || selected.includes('e2e')) {
    try {
      buildWeb();
    } catch {
      ok = false;
    }
    const server = startTs('server/index.ts', testEnv, { quiet: true });
    children.push(server);
    await waitForPort(appPort, 30_000);
    const e2eOut = path.join(tmpRoot, 'e2e.json');
    ok = step('browser tests (Chromium)', bin('jest'), ['--selectProjects', 'e2e', '--ci', '--runInBand', '--json', `--outputFile=${e2eOut}`, ...patterns], {
      ...testEnv,
      E2E_BASE_URL: `http://127.0.0.1:${appPort}`,
    }) && ok;
    addTotals(e2eOut);
  }

  console.log(`\n${ok ? 'All checks passed.' : 'Some checks FAILED.'}`);
  console.log(`tests: ${totals.passed} passed, ${totals.failed} failed`);
  cleanup();
  process.exit(ok && totals.failed === 0 ? 0 : 1);
}

process.on('SIGINT', () => {
  cleanup();
  process.exit(130);
});
main().catch((err) => {
  console.error(err);
  cleanup();
  process.exit(1);
});
void spawn;
