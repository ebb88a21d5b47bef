import fs from 'node:fs';
import type { Browser, Page } from 'playwright-core';
import type { AxeResults, Result } from 'axe-core';
import { BASE_URL, launchBrowser, newPage, PHONE, screenshot, signIn, waitUntil, WIDE } from '../helpers/browser';
import { apiGet, apiToken, programId } from '../helpers/api';
import type { AssetList } from '../../shared/schemas/assets';
import type { ProgramReadiness } from '../../shared/schemas/readiness';

// An axe-core scan of every main screen at phone and desktop width, signed in as a role that
// works there. Serious and critical violations fail the test; each is printed with its rule,
// the element and axe's help text. Moderate and minor ones are printed but do not fail.

const AXE_SOURCE = fs.readFileSync(require.resolve('axe-core/axe.min.js'), 'utf8');

type Role = 'technician' | 'engineer' | 'coordinator' | 'driver' | 'lead' | 'admin';
type Ids = { asset: string; finding: string; stage: string; review: string; test: string };
type Target = { name: string; role: Role | null; path: (ids: Ids) => string; ready: string };

const SCREENS: Target[] = [
  { name: 'sign-in', role: null, path: () => '/sign-in', ready: 'sign-in-email' },
  { name: 'home', role: 'technician', path: () => '/', ready: 'home-user-name' },
  { name: 'asset list', role: 'technician', path: () => '/assets', ready: 'asset-list' },
  { name: 'asset detail', role: 'technician', path: (ids) => `/assets/${ids.asset}`, ready: 'asset-tag' },
  { name: 'checklist', role: 'technician', path: (ids) => `/assets/${ids.asset}/checklist`, ready: 'checklist-progress' },
  { name: 'findings list', role: 'technician', path: () => '/findings', ready: 'findings-list' },
  { name: 'finding detail', role: 'technician', path: (ids) => `/findings/${ids.finding}`, ready: 'finding-status' },
  { name: 'new finding', role: 'technician', path: (ids) => `/findings/new?assetId=${ids.asset}`, ready: 'finding-title' },
  { name: 'readiness roll-up', role: 'lead', path: () => '/readiness', ready: 'readiness-rollup' },
  { name: 'stage trend', role: 'lead', path: (ids) => `/readiness/${ids.stage}`, ready: 'stage-trend' },
  { name: 'gate list', role: 'lead', path: () => '/gates', ready: 'gate-list' },
  { name: 'gate review', role: 'lead', path: (ids) => `/gates/${ids.review}`, ready: 'gate-blockers' },
  { name: 'validation plan', role: 'engineer', path: () => '/validation', ready: 'validation-screen' },
  { name: 'test detail', role: 'engineer', path: (ids) => `/validation/tests/${ids.test}`, ready: 'vtest-detail' },
  { name: 'asset software', role: 'engineer', path: (ids) => `/assets/${ids.asset}/software`, ready: 'asset-software' },
  { name: 'ECU catalogue', role: 'engineer', path: () => '/software/ecus', ready: 'ecu-catalogue-screen' },
  { name: 'baselines', role: 'engineer', path: () => '/software/baselines', ready: 'baselines-screen' },
  { name: 'campaigns', role: 'engineer', path: () => '/validation/campaigns', ready: 'campaigns-screen' },
  { name: 'my gate actions', role: 'lead', path: () => '/gates/actions', ready: 'my-gate-actions' },
  { name: 'booking form', role: 'coordinator', path: () => '/fleet/new', ready: 'fleet-book' },
  { name: 'drivers', role: 'coordinator', path: () => '/fleet/drivers', ready: 'fleet-drivers' },
  { name: 'utilisation', role: 'coordinator', path: () => '/fleet/utilisation', ready: 'fleet-utilisation' },
  { name: 'software matrix', role: 'engineer', path: () => '/software', ready: 'software-matrix-screen' },
  { name: 'reflash list', role: 'engineer', path: () => '/software/reflash', ready: 'software-reflash-screen' },
  { name: 'import', role: 'engineer', path: () => '/software/import', ready: 'software-import-screen' },
  { name: 'fleet plan', role: 'coordinator', path: () => '/fleet', ready: 'fleet-plan' },
  { name: 'proposals', role: 'coordinator', path: () => '/fleet/proposals', ready: 'fleet-proposals' },
  { name: 'my drives', role: 'driver', path: () => '/fleet/mine', ready: 'fleet-mine' },
  { name: 'stages', role: 'lead', path: () => '/stages', ready: 'stages-screen' },
  { name: 'users', role: 'admin', path: () => '/admin/users', ready: 'invite-email' },
  { name: 'programs', role: 'admin', path: () => '/admin/programs', ready: 'programs-screen' },
  { name: 'dev inbox', role: null, path: () => '/dev/inbox', ready: 'dev-inbox' },
];

const FAILING_IMPACTS = new Set(['serious', 'critical']);

let browser: Browser;
let ids: Ids;

beforeAll(async () => {
  browser = await launchBrowser();
  const lead = await apiToken('lead@fenwater.example');
  const program = await programId(lead, 'FW3');
  const assets = await apiGet<AssetList>(lead, `/api/assets?programId=${program}&limit=5`);
  const findings = await apiGet<{ items: Array<{ id: string }> }>(lead, `/api/findings?programId=${program}&status=active&limit=5`);
  const rollup = await apiGet<ProgramReadiness>(lead, `/api/programs/${program}/readiness`);
  const stage = rollup.stages.find((s) => s.assetCount > 0)!;
  const reviews = await apiGet<{ items: Array<{ id: string }> }>(lead, `/api/gate-reviews?programId=${program}`);
  const tests = await apiGet<{ tests: Array<{ id: string }> }>(lead, `/api/validation/tests?programId=${program}`);
  let review = reviews.items[0]?.id;
  if (!review) {
    const res = await fetch(`${BASE_URL}/api/gate-reviews`, {
      method: 'POST',
      headers: { authorization: `Bearer ${lead}`, 'content-type': 'application/json' },
      body: JSON.stringify({ stageId: stage.stageId, notes: 'Accessibility scan' }),
    });
    review = ((await res.json()) as { id: string }).id;
  }
  ids = { asset: assets.items[0].id, finding: findings.items[0].id, stage: stage.stageId, review, test: tests.tests[0].id };
});
afterAll(async () => {
  await browser?.close();
});

/** Waits until the screen's own element shows and nothing on it is still loading. */
async function settle(page: Page, ready: string) {
  await page.getByTestId(ready).first().waitFor();
  await page.waitForLoadState('networkidle').catch(() => undefined);
  await waitUntil('nothing is loading', async () => (await page.locator('[aria-busy="true"]').count()) === 0, 15_000).catch(() => undefined);
  // Web fonts swap in after the first paint; contrast is measured on the final text.
  await page.evaluate(() => document.fonts.ready.then(() => undefined));
}

async function scan(page: Page): Promise<AxeResults> {
  if (!(await page.evaluate(() => 'axe' in window))) await page.addScriptTag({ content: AXE_SOURCE });
  return page.evaluate(() => {
    type Axe = typeof import('axe-core') & {
      commons: { text: { accessibleTextVirtual: (v: unknown) => string }; aria: { getRole: (n: Element) => string | null } };
    };
    const axe = (window as unknown as { axe: Axe }).axe;
    // Label in name (WCAG 2.5.3) stays on, with its text read the way the page lays it out.
    // axe's own check joins the text of sibling elements with no space between them; on
    // react-native-web every <Text> is its own block <div> with no whitespace around it, so a
    // card showing "Bench" over "8 assets" reads as "bench8 assets" and no name can contain
    // it. This check takes the element's innerText instead (block boxes end words, as the
    // ACT rule 2ee8b8 defines visible text) and then asks what axe asks: do the visible
    // words appear, in order and together, in the accessible name?
    axe.configure({
      checks: [
        {
          id: 'label-content-name-mismatch',
          evaluate(node: Element, _options: unknown, virtualNode: unknown) {
            const words = (text: string) =>
              text
                .normalize('NFKD')
                .replace(/\([^()]*\)/g, ' ')
                .toLowerCase()
                .replace(/[^\p{L}\p{N}]+/gu, ' ')
                .split(' ')
                .filter(Boolean);
            const visible = words((node as HTMLElement).innerText ?? '');
            if (!visible.length) return true;
            const name = words(axe.commons.text.accessibleTextVirtual(virtualNode));
            for (let i = 0; i + visible.length <= name.length; i += 1) {
              if (visible.every((word, j) => word === name[i + j])) return true;
            }
            // As in axe: a checkbox, radio or switch may show its value beside its label.
            return ['switch', 'checkbox', 'radio', 'menuitemcheckbox', 'menuitemradio'].includes(axe.commons.aria.getRole(node) ?? '') ? undefined : false;
          },
        },
      ],
    });
    return axe.run(document, { resultTypes: ['violations'] });
  });
}

function describeViolation(screen: string, v: Result): string {
  const nodes = v.nodes
    .slice(0, 8)
    .map((n) => `      at ${n.target.join(' ')}\n        ${n.html.slice(0, 240)}${n.failureSummary ? `\n        ${n.failureSummary.replace(/\n/g, '\n        ')}` : ''}`)
    .join('\n');
  const more = v.nodes.length > 8 ? `\n      ... and ${v.nodes.length - 8} more` : '';
  return `  [${v.impact}] ${v.id} on ${screen}: ${v.help}\n    ${v.helpUrl}\n${nodes}${more}`;
}

describe.each([
  ['phone', PHONE],
  ['wide', WIDE],
])('accessibility at %s width', (label, viewport) => {
  // One signed-in page per role, reused across that role's screens.
  const pages = new Map<Role | 'none', Page>();
  async function pageFor(role: Role | null): Promise<Page> {
    const key = role ?? 'none';
    let page = pages.get(key);
    if (!page) {
      page = await newPage(browser, viewport, { bypassCSP: true });
      if (role) {
        await signIn(page, `${role}@fenwater.example`);
        await page.getByTestId('home-user-name').waitFor();
      }
      pages.set(key, page);
    }
    return page;
  }
  afterAll(async () => {
    for (const page of pages.values()) await page.context().close();
  });

  it.each(SCREENS.map((s) => [s.name, s] as const))('the %s screen has no serious or critical violations', async (name, target) => {
    const page = await pageFor(target.role);
    await page.goto(`${BASE_URL}${target.path(ids)}`);
    await settle(page, target.ready);
    const results = await scan(page);
    const failing = results.violations.filter((v) => FAILING_IMPACTS.has(v.impact ?? ''));
    const other = results.violations.filter((v) => !FAILING_IMPACTS.has(v.impact ?? ''));
    if (other.length) console.log(`${name} at ${label} width, not failing:\n${other.map((v) => describeViolation(name, v)).join('\n')}`);
    await screenshot(page, `a11y-${name.replace(/\s+/g, '-')}-${label}`);
    if (failing.length) throw new Error(`${failing.length} serious or critical violations on ${name} at ${label} width:\n${failing.map((v) => describeViolation(name, v)).join('\n')}`);
  }, 60_000);
});
