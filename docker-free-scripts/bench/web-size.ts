// First-load JavaScript of a web export: the scripts dist/index.html loads (script tags and
// script preloads), each gzipped the way the server's compression middleware sends it (zlib's
// default level). The floor is an empty Expo Router app exported in the same run from the same
// node_modules, so the versions match.
import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import zlib from 'node:zlib';
import { ROOT } from '../lib/services';

export type FirstLoad = { files: Array<{ file: string; bytes: number; gzip: number }>; bytes: number; gzip: number };

export function firstLoadJs(distDir: string): FirstLoad {
  const html = fs.readFileSync(path.join(distDir, 'index.html'), 'utf8');
  const refs = new Set<string>();
  for (const m of html.matchAll(/<script\b[^>]*\bsrc="([^"]+)"/g)) refs.add(m[1]);
  for (const m of html.matchAll(/<link\b[^>]*\brel="(?:modulepreload|preload)"[^>]*>/g)) {
    const href = /\bhref="([^"]+)"/.exec(m[0])?.[1];
    if (href && (/\bas="script"/.test(m[0]) || m[0].includes('modulepreload'))) refs.add(href);
  }
  const files = [...refs]
    .filter((ref) => !/^https?:/.test(ref))
    .map((ref) => {
      const file = path.join(distDir, decodeURIComponent(ref.replace(/^\//, '').split('?')[0]));
      const buf = fs.readFileSync(file);
      return { file: path.relative(distDir, file), bytes: buf.length, gzip: zlib.gzipSync(buf).length };
    });
  if (!files.length) throw new Error(`${distDir}/index.html loads no script`);
  return { files, bytes: files.reduce((s, f) => s + f.bytes, 0), gzip: files.reduce((s, f) => s + f.gzip, 0) };
}

function expoExport(cwd: string, outDir: string) {
  // Its own Metro cache (Metro keeps it under $TMPDIR/metro-cache): with the shared one, a build
  // in a new temporary folder reused expo-router's cached route context of an earlier folder,
  // and the app it exported found no routes ("No routes found", a blank page under Lighthouse).
  const tmp = path.join(cwd, '.tmp');
  fs.mkdirSync(tmp, { recursive: true });
  const res = spawnSync(path.join(ROOT, 'node_modules', '.bin', 'expo'), ['export', '--platform', 'web', '--output-dir', outDir], {
    cwd,
    stdio: ['ignore', 'ignore', 'pipe'],
    encoding: 'utf8',
    env: { ...process.env, CI: '1', EXPO_NO_TELEMETRY: '1', TMPDIR: tmp },
    timeout: 10 * 60_000,
  });
  if (res.status !== 0) throw new Error(`expo export in ${cwd} failed: ${(res.stderr ?? '').slice(-2000) || res.error?.message}`);
}

/**
 * An empty Expo Router app (a root layout with <Slot/> and one screen with a Text), with the
 * project's own `web.output`, in `dir`, its node_modules a symlink to the project's.
 */
export function buildEmptyApp(dir: string): string {
  fs.mkdirSync(path.join(dir, 'app'), { recursive: true });
  const projectWeb = JSON.parse(fs.readFileSync(path.join(ROOT, 'app.json'), 'utf8')).expo?.web ?? {};
  fs.writeFileSync(path.join(dir, 'package.json'), JSON.stringify({ name: 'bench-empty-app', version: '0.0.0', private: true, main: 'expo-router/entry' }, null, 2));
  fs.writeFileSync(
    path.join(dir, 'app.json'),
    JSON.stringify({ expo: { name: 'empty', slug: 'empty', scheme: 'empty', web: { bundler: 'metro', output: projectWeb.output ?? 'single' }, plugins: ['expo-router'] } }, null, 2),
  );
  fs.writeFileSync(path.join(dir, 'app', '_layout.tsx'), "import { Slot } from 'expo-router';\n\nexport default function Layout() {\n  return <Slot />;\n}\n");
  fs.writeFileSync(path.join(dir, 'app', 'index.tsx'), "import { Text } from 'react-native';\n\nexport default function Index() {\n  return <Text>Empty</Text>;\n}\n");
  const link = path.join(dir, 'node_modules');
  if (!fs.existsSync(link)) fs.symlinkSync(path.join(ROOT, 'node_modules'), link, 'dir');
  expoExport(dir, 'dist');
  return path.join(dir, 'dist');
}
