// Lighthouse (mobile preset, simulated throttling: its defaults) on the signed-in asset list.
// Lighthouse cannot sign in, so Debian's Chromium starts with a remote-debugging port,
// playwright-core connects to it and writes the token and the chosen program into the origin's
// localStorage from a page that loads no app code (/api/health), then Lighthouse runs against
// the same browser. Lighthouse's storage reset still clears the HTTP cache (a cold first load)
// and, with the storage types named below, leaves localStorage alone.
import { spawn, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import { chromium } from 'playwright-core';
import { freePort, waitForPort } from '../lib/ports';
import { withTimeout } from './common';

export const CHROMIUM_FLAGS = [
  '--headless',
  '--no-sandbox',
  '--disable-gpu',
  '--disable-quic',
  '--no-first-run',
  '--disable-background-networking',
  '--disable-component-update',
  '--disable-sync',
];

export type LighthouseRun = {
  score: number;
  lcpMs: number;
  tbtMs: number;
  cls: number;
  fcpMs: number;
  finalUrl: string;
  signedIn: boolean;
  /** Redirects of the page's own URL, e.g. "/assets -> 301". */
  redirects: string[];
  /** Lighthouse's CPU benchmark of the machine during the run (higher is faster; it drops when other work competes). */
  benchmarkIndex: number;
};
export type LighthouseFigure = LighthouseRun & { runs: LighthouseRun[]; url: string; chromium: string; lighthouse: string };

type Lhr = {
  lighthouseVersion: string;
  finalDisplayedUrl: string;
  environment?: { hostUserAgent?: string; benchmarkIndex?: number };
  categories: { performance?: { score: number | null } };
  audits: Record<string, { numericValue?: number; details?: { items?: Array<{ url?: string; statusCode?: number; resourceType?: string }> } }>;
  runtimeError?: { code?: string; message: string };
};

const samePath = (a: string, b: string) => new URL(a).pathname.replace(/\/$/, '') === new URL(b).pathname.replace(/\/$/, '');

async function startChromium(userDataDir: string): Promise<{ child: ChildProcess; port: number }> {
  const port = await freePort();
  const child = spawn(
    '/usr/bin/chromium',
    [...CHROMIUM_FLAGS, `--user-data-dir=${userDataDir}`, `--remote-debugging-port=${port}`, '--remote-debugging-address=127.0.0.1', 'about:blank'],
    { stdio: ['ignore', 'ignore', 'ignore'] },
  );
  await waitForPort(port, 30_000);
  return { child, port };
}

async function setSession(port: number, origin: string, items: Record<string, string>) {
  const browser = await chromium.connectOverCDP(`http://127.0.0.1:${port}`);
  try {
    const context = browser.contexts()[0];
    const page = await context.newPage();
    await page.goto(`${origin}/api/health`, { timeout: 30_000 });
    await page.evaluate((entries) => {
      for (const [k, v] of Object.entries(entries)) window.localStorage.setItem(k, v);
    }, items);
    await page.close();
  } finally {
    await browser.close();
  }
}

export async function runLighthouse(opts: {
  origin: string;
  route: string;
  storage: Record<string, string>;
  /** A request the signed-in page makes (proof that it did not land on the sign-in screen). */
  signedInRequest: RegExp;
  runs: number;
  tmpDir: string;
  /** Where to keep the median run's HTML report. */
  reportFile?: string;
}): Promise<LighthouseFigure> {
  const { default: lighthouse, generateReport } = await import('lighthouse');
  const { computeMedianRun } = (await import('lighthouse/core/lib/median-run.js')) as unknown as {
    computeMedianRun: (runs: Lhr[]) => Lhr;
  };
  const lhrs: Lhr[] = [];
  const url = opts.origin + opts.route;
  // A run that ends in a Lighthouse runtime error (headless Chromium now and then reports NO_FCP
  // for a page that paints) is tried once more in a fresh browser; a second error fails the part.
  let retried = false;
  for (let i = 0; i < opts.runs; i += 1) {
    // A fresh profile folder for every browser, so no run inherits another's state.
    const dir = fs.mkdtempSync(path.join(opts.tmpDir, `chromium-${i}-`));
    fs.mkdirSync(dir, { recursive: true });
    const { child, port } = await startChromium(dir);
    try {
      await setSession(port, opts.origin, opts.storage);
      const result = await withTimeout(
        lighthouse(url, {
          port,
          output: 'json',
          logLevel: 'error',
          onlyCategories: ['performance'],
          // Lighthouse's defaults, named so localStorage (the session) is never among them.
          clearStorageTypes: ['file_systems', 'shader_cache', 'service_workers', 'cache_storage'],
        }),
        180_000,
        'Lighthouse',
      );
      if (!result) throw new Error('Lighthouse gave no result');
      const lhr = result.lhr as unknown as Lhr;
      if (lhr.runtimeError) {
        if (retried) throw new Error(`Lighthouse: ${lhr.runtimeError.message}`);
        retried = true;
        console.log(`bench: Lighthouse run ${i + 1} of ${url}: ${lhr.runtimeError.code ?? lhr.runtimeError.message}; trying it once more`);
        i -= 1;
        continue;
      }
      lhrs.push(lhr);
    } finally {
      child.kill('SIGTERM');
    }
  }
  const toRun = (lhr: Lhr): LighthouseRun => {
    const requests = lhr.audits['network-requests']?.details?.items ?? [];
    return {
      score: Math.round((lhr.categories.performance?.score ?? 0) * 100),
      lcpMs: lhr.audits['largest-contentful-paint']?.numericValue ?? NaN,
      tbtMs: lhr.audits['total-blocking-time']?.numericValue ?? NaN,
      cls: lhr.audits['cumulative-layout-shift']?.numericValue ?? NaN,
      fcpMs: lhr.audits['first-contentful-paint']?.numericValue ?? NaN,
      finalUrl: lhr.finalDisplayedUrl,
      // It stayed on the page asked for (not sent to sign-in; a trailing slash aside) and asked the API for its data.
      signedIn: samePath(lhr.finalDisplayedUrl, url) && requests.some((r) => opts.signedInRequest.test(r.url ?? '')),
      redirects: requests
        .filter((r) => (r.statusCode ?? 0) >= 300 && (r.statusCode ?? 0) < 400 && !!r.url && samePath(r.url, url))
        .map((r) => `${new URL(r.url ?? url).pathname} -> ${r.statusCode}`),
      benchmarkIndex: lhr.environment?.benchmarkIndex ?? NaN,
    };
  };
  const runs = lhrs.map(toRun);
  const medianLhr = lhrs.length > 1 ? computeMedianRun(lhrs) : lhrs[0];
  const chosen = toRun(medianLhr);
  if (opts.reportFile) {
    fs.mkdirSync(path.dirname(opts.reportFile), { recursive: true });
    fs.writeFileSync(opts.reportFile, generateReport(medianLhr as unknown as Parameters<typeof generateReport>[0], 'html'));
  }
  const versionLine = /Chrome\/([\d.]+)/.exec(medianLhr.environment?.hostUserAgent ?? '')?.[1] ?? 'unknown';
  return { ...chosen, runs, url, chromium: versionLine, lighthouse: medianLhr.lighthouseVersion };
}

