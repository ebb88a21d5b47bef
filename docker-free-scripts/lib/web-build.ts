import { spawnSync } from 'node:child_process';
import crypto from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { ROOT } from './services';

const SOURCES = ['app', 'components', 'hooks', 'shared', 'assets', 'app.json', 'package-lock.json', 'babel.config.js'];

function fingerprint(): string {
  const hash = crypto.createHash('sha1');
  const walk = (p: string) => {
    if (!fs.existsSync(p)) return;
    const stat = fs.statSync(p);
    if (stat.isDirectory()) for (const f of fs.readdirSync(p).sort()) walk(path.join(p, f));
    else hash.update(`${p}:${stat.size}:${stat.mtimeMs}`);
  };
  for (const s of SOURCES) walk(path.join(ROOT, s));
  return hash.digest('hex');
}

/** Where the web build goes: ./dist, or WEB_DIST (an absolute path) so that two checkouts' test runs don't share one. */
export function webDistDir(): string {
  return process.env.WEB_DIST ? path.resolve(process.env.WEB_DIST) : path.join(ROOT, 'dist');
}

/** Exports the web app to dist/ (or WEB_DIST) with Expo, unless it was built from the same sources. */
export function buildWeb(opts: { force?: boolean } = {}): void {
  const dist = webDistDir();
  const stamp = path.join(dist, '.proofyard-build');
  const fp = fingerprint();
  if (!opts.force && fs.existsSync(stamp) && fs.readFileSync(stamp, 'utf8') === fp) {
    console.log('proofyard: web app already built from these sources');
    return;
  }
  console.log('proofyard: building the web app (expo export)...');
  const res = spawnSync(path.join(ROOT, 'node_modules', '.bin', 'expo'), ['export', '--platform', 'web', '--output-dir', dist], {
    cwd: ROOT,
    stdio: ['ignore', 'ignore', 'inherit'],
    env: { ...process.env, CI: '1', EXPO_NO_TELEMETRY: '1' },
  });
  if (res.status !== 0) throw new Error('expo export failed');
  fs.writeFileSync(stamp, fp);
}
