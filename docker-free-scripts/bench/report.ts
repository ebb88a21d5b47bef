// The table of figures with their goals, as markdown (printed and written to
// bench-results/latest.md) and the raw figures as JSON (bench-results/latest.json).
import fs from 'node:fs';
import path from 'node:path';
import type { ApiFigure } from './api';
import { kib, ms, ratio } from './common';
import type { LighthouseFigure } from './lighthouse';
import type { LoadFigure } from './load';
import type { PhotoFigure } from './photos';
import type { ScaleData } from './scale-data';
import type { FirstLoad } from './web-size';

export type Verdict = 'meets' | 'misses' | '—';
export type Row = { area: string; figure: string; value: string; goal: string; verdict: Verdict };

export type Results = {
  startedAt: string;
  seconds: number;
  quick: boolean;
  machine: { cpus: number; loadAverageAtStart: number[]; node: string; postgres: string };
  scale?: ScaleData;
  web?: { app: FirstLoad; empty: FirstLoad; ratio: number };
  lighthouse?: { app?: LighthouseFigure; empty?: LighthouseFigure };
  api?: ApiFigure[];
  load?: LoadFigure;
  photo?: PhotoFigure;
  /** The 1-minute load average when each part started: other work on the machine skews the times. */
  loadAverage: Record<string, number>;
  notes: string[];
  failures: string[];
};

// STACK.md "Performance facts measured here": an empty Expo Router app, `web.output: "single"`.
const FLOOR = { score: 89, lcpMs: 2830, tbtMs: 313 };
// Core Web Vitals "good" limit for CLS (web.dev, Google).
const CLS_GOOD = 0.1;

const verdict = (ok: boolean): Verdict => (ok ? 'meets' : 'misses');
const secs = (v: number) => `${(v / 1000).toFixed(2)} s`;
const bytes = (n: number) => (n >= 1024 * 1024 ? `${(n / 1024 / 1024).toFixed(2)} MiB` : kib(n));

export function rows(r: Results): Row[] {
  const out: Row[] = [];
  if (r.web) {
    out.push({ area: 'Web', figure: 'First-load JS of the signed-in home route, gzip', value: `${kib(r.web.app.gzip)} (${r.web.app.files.length} file${r.web.app.files.length === 1 ? '' : 's'}, ${kib(r.web.app.bytes)} raw)`, goal: 'no number set', verdict: '—' });
    out.push({ area: 'Web', figure: 'Same, empty Expo Router app (the floor), same run and versions', value: `${kib(r.web.empty.gzip)} (${kib(r.web.empty.bytes)} raw)`, goal: 'STACK.md: about 290 KiB', verdict: '—' });
    out.push({ area: 'Web', figure: 'Ratio app / floor', value: ratio(r.web.ratio), goal: 'no number set (STACK.md small app: 440 / 288 KiB = 1.53x)', verdict: '—' });
  }
  const lh = r.lighthouse?.app;
  if (lh) {
    const where = `Lighthouse ${new URL(lh.url).pathname} (mobile)`;
    const signed = lh.signedIn ? '' : ' (NOT signed in: the page never asked for /api/assets)';
    const redirected = lh.redirects.length ? `; the page's URL redirected first: ${lh.redirects.join(', ')}` : '';
    out.push({ area: where, figure: 'Performance score', value: `${lh.score}${signed}${redirected} (CPU benchmark index ${Math.round(lh.benchmarkIndex)})`, goal: `>= ${FLOOR.score} (STACK.md empty-app floor)`, verdict: verdict(lh.signedIn && lh.score >= FLOOR.score) });
    out.push({ area: where, figure: 'Largest Contentful Paint', value: secs(lh.lcpMs), goal: `<= ${secs(FLOOR.lcpMs)} (STACK.md floor)`, verdict: verdict(lh.signedIn && lh.lcpMs <= FLOOR.lcpMs) });
    out.push({ area: where, figure: 'Total Blocking Time', value: ms(lh.tbtMs), goal: `<= ${FLOOR.tbtMs} ms (STACK.md floor)`, verdict: verdict(lh.signedIn && lh.tbtMs <= FLOOR.tbtMs) });
    out.push({ area: where, figure: 'Cumulative Layout Shift', value: lh.cls.toFixed(3), goal: `<= ${CLS_GOOD} (Core Web Vitals "good")`, verdict: verdict(lh.signedIn && lh.cls <= CLS_GOOD) });
  }
  const le = r.lighthouse?.empty;
  if (le) {
    out.push({ area: 'Lighthouse, empty app (same run)', figure: 'Score / LCP / TBT / CLS', value: `${le.score} / ${secs(le.lcpMs)} / ${ms(le.tbtMs)} / ${le.cls.toFixed(3)} (CPU benchmark index ${Math.round(le.benchmarkIndex)})`, goal: 'reference: this machine\'s floor now', verdict: '—' });
  }
  for (const a of r.api ?? []) {
    const area = `API: ${a.name}`;
    if (Number.isFinite(a.ratio)) {
      out.push({
        area,
        figure: 'Endpoint (HTTP) / bare SQL, median',
        value: `${ms(a.endpointMs)} / ${ms(a.bareMs)} = ${ratio(a.ratio)} (${a.runs} runs, 5,000 assets)`,
        goal: a.goalRatio ? `<= ${a.goalRatio}x bare SQL (${a.source})` : 'no ratio set',
        verdict: a.goalRatio ? verdict(a.ratio <= a.goalRatio) : '—',
      });
    } else {
      out.push({ area, figure: 'Endpoint / bare SQL', value: a.note ?? 'not measured', goal: a.goalRatio ? `<= ${a.goalRatio}x bare SQL (${a.source})` : 'no ratio set', verdict: a.goalRatio ? 'misses' : '—' });
    }
    out.push({
      area,
      figure: 'SQL statements per request, 50 / 5,000 assets',
      value: `${a.statementsSmall} / ${a.statementsBig}`,
      goal: `fixed: the same at both sizes (${a.source})`,
      verdict: verdict(a.statementsSmall === a.statementsBig && a.statementsBig > 0),
    });
  }
  if (r.load) {
    const l = r.load;
    const area = `Load: ${l.connections} connections, ${l.seconds} s`;
    out.push({ area, figure: 'Requests per second (mean)', value: `${l.rps.toFixed(1)} (${l.requests} requests)`, goal: 'no number set', verdict: '—' });
    out.push({ area, figure: 'Latency p50 / p99', value: `${l.p50} ms / ${l.p99} ms`, goal: 'no number set', verdict: '—' });
    const bad = l.unexpectedNon2xx + l.errors + l.timeouts;
    out.push({
      area,
      figure: 'Errors (non-2xx other than 409, socket errors, timeouts)',
      value: `${bad} (non-2xx ${l.unexpectedNon2xx}, errors ${l.errors}, timeouts ${l.timeouts}); 409 stale version (expected): ${l.conflicts409}`,
      goal: '0 (the bench\'s own bar)',
      verdict: verdict(bad === 0),
    });
  }
  if (r.photo) {
    const p = r.photo;
    out.push({
      area: 'Photos: 12 MP test image',
      figure: 'Bytes sent / original',
      value: `${bytes(p.sentBytes)} / ${bytes(p.originalBytes)} = ${(p.ratio * 100).toFixed(1)} % (${p.width}x${p.height} -> ${p.sentWidth}x${p.sentHeight}, JPEG q${Math.round(p.quality * 100)})`,
      goal: `long side about ${p.longSide} px (issue 3)`,
      verdict: verdict(Math.max(p.sentWidth, p.sentHeight) <= p.longSide),
    });
  }
  return out;
}

const cell = (s: string) => s.replace(/\|/g, '\\|');

export function markdown(r: Results): string {
  const lines: string[] = [];
  lines.push(`# Proofyard benchmark`);
  lines.push('');
  lines.push(`Run ${r.startedAt}${r.quick ? ' (BENCH_QUICK=1: fewer runs, shorter load)' : ''}, ${r.seconds.toFixed(0)} s in all. Machine: ${r.machine.cpus} CPUs, load average at start ${r.machine.loadAverageAtStart.map((v) => v.toFixed(1)).join(' / ')}, Node ${r.machine.node}, ${r.machine.postgres}. Reproduce: \`npm run bench\`.`);
  lines.push('');
  lines.push('| Area | Figure | Measured | Goal | Verdict |');
  lines.push('|---|---|---|---|---|');
  for (const row of rows(r)) lines.push(`| ${cell(row.area)} | ${cell(row.figure)} | ${cell(row.value)} | ${cell(row.goal)} | ${row.verdict} |`);
  const missed = rows(r).filter((row) => row.verdict === 'misses');
  lines.push('');
  lines.push(missed.length ? `Misses its goal: ${missed.map((m) => `${m.area} ${m.figure.toLowerCase()}`).join('; ')}.` : 'Every figure with a goal meets it.');
  if (r.failures.length) {
    lines.push('');
    lines.push('Parts that failed in this run:');
    for (const f of r.failures) lines.push(`- ${f}`);
  }
  if (r.scale) {
    const s = r.scale;
    lines.push('');
    lines.push(`Scale data (throwaway cluster, generated in ${s.seconds.toFixed(1)} s): ${Object.entries(s.counts).map(([k, v]) => `${k} ${v.toLocaleString('en-US')}`).join(', ')}.`);
    for (const line of s.skipped) lines.push(`- ${line}`);
  }
  const loads = Object.entries(r.loadAverage);
  if (loads.length) {
    lines.push('');
    lines.push(`1-minute load average as each part started (${r.machine.cpus} CPUs; above that, other work competed for them): ${loads.map(([k, v]) => `${k} ${v.toFixed(1)}`).join(', ')}.`);
  }
  if (r.notes.length) {
    lines.push('');
    lines.push('How each figure is taken:');
    for (const n of r.notes) lines.push(`- ${n}`);
  }
  return `${lines.join('\n')}\n`;
}

export function writeResults(dir: string, r: Results): string {
  fs.mkdirSync(dir, { recursive: true });
  const md = markdown(r);
  fs.writeFileSync(path.join(dir, 'latest.md'), md);
  fs.writeFileSync(path.join(dir, 'latest.json'), `${JSON.stringify({ ...r, rows: rows(r) }, null, 2)}\n`);
  return md;
}
