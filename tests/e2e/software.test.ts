import fs from 'node:fs';
import path from 'node:path';
import type { Browser, Page } from 'playwright-core';
import { BASE_URL, launchBrowser, newPage, screenshot, signIn, waitUntil, WIDE } from '../helpers/browser';
import { apiGet, apiToken, programId } from '../helpers/api';
import type { SoftwareMatrix } from '../../shared/schemas/software';

const SAMPLE = path.resolve('assets/demo/ecu-readout-sample.csv');

let browser: Browser;
beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
});

type SampleRow = { tag: string; ecu: string; version: string };

function sampleRows(): SampleRow[] {
  const [header, ...lines] = fs.readFileSync(SAMPLE, 'utf8').trim().split(/\r?\n/);
  const names = header.split(',');
  const at = (name: string) => names.indexOf(name);
  return lines.map((line) => {
    const values = line.split(',');
    return { tag: values[at('asset_tag')], ecu: values[at('ecu')], version: values[at('F189')] };
  });
}

/** Every matrix row of the program, over the API (keyset pages). */
async function wholeMatrix(token: string, program: string) {
  const rows: SoftwareMatrix['rows'] = [];
  let ecus: SoftwareMatrix['ecus'] = [];
  let cursor: string | null = null;
  do {
    const page: SoftwareMatrix = await apiGet<SoftwareMatrix>(
      token,
      `/api/software/matrix?programId=${program}&limit=200${cursor ? `&cursor=${encodeURIComponent(cursor)}` : ''}`,
    );
    ecus = page.ecus;
    rows.push(...page.rows);
    cursor = page.nextCursor;
  } while (cursor);
  return { rows, ecus };
}

/** A cell the sample names: preferably one whose recorded version the import will change. */
async function cellToWatch(token: string, program: string): Promise<SampleRow> {
  const { rows, ecus } = await wholeMatrix(token, program);
  const codeToId = new Map(ecus.map((e) => [e.code, e.id]));
  const known = sampleRows().filter((s) => {
    const row = rows.find((r) => r.tag === s.tag);
    return row?.cells.some((c) => c.ecuId === codeToId.get(s.ecu));
  });
  const installed = (s: SampleRow) => rows.find((r) => r.tag === s.tag)?.cells.find((c) => c.ecuId === codeToId.get(s.ecu))?.installed;
  const changing = known.find((s) => installed(s) !== s.version);
  const watched = changing ?? known[0];
  if (!watched) throw new Error('no cell of the sample read-out is in the demo matrix');
  return watched;
}

/** Pages through the matrix on screen until the cell shows, then returns its text. */
async function cellText(page: Page, testID: string): Promise<string> {
  let text = '';
  await waitUntil(
    `${testID} shows`,
    async () => {
      const cell = page.getByTestId(testID);
      if ((await cell.count()) > 0) {
        text = (await cell.first().textContent()) ?? '';
        return true;
      }
      const more = page.getByTestId('matrix-more');
      if ((await more.count()) > 0) await more.click();
      return false;
    },
    30_000,
  );
  return text;
}

describe('engineer on a wide screen', () => {
  it('when an engineer imports the sample read-out skipping the rows that cannot be applied, then the matrix shows the new version and the reflash list exports', async () => {
    const token = await apiToken('engineer@fenwater.example');
    const program = await programId(token, 'FW3');
    const watched = await cellToWatch(token, program);

    const page = await newPage(browser, WIDE);
    await signIn(page, 'engineer@fenwater.example', 'proofyard-demo', '/software/import');
    await page.waitForURL(/\/software\/import/);

    const chooser = page.waitForEvent('filechooser');
    await page.getByTestId('import-file').click();
    await (await chooser).setFiles(SAMPLE);

    const preview = page.getByTestId('import-preview');
    await preview.waitFor();
    await page.getByTestId('import-row-1').waitFor();
    // The sample holds a row for an asset that does not exist: it is listed as unknown with its reason.
    await expect(preview.textContent()).resolves.toContain('Unknown');
    await screenshot(page, 'software-import-preview-wide');

    await page.getByTestId('import-skip-invalid').click();
    await expect(page.getByTestId('import-skip-invalid').getAttribute('aria-checked')).resolves.toBe('true');
    const apply = page.getByTestId('import-apply');
    if (await apply.isEnabled()) {
      await apply.click();
      await page.getByTestId('import-done').waitFor();
      await expect(page.getByTestId('import-done').textContent()).resolves.toMatch(/^Imported: \d+ ECUs? updated/);
    }

    await page.goto(`${BASE_URL}/software`);
    await page.getByTestId('software-matrix').waitFor();
    const text = await cellText(page, `matrix-cell-${watched.tag}-${watched.ecu}`);
    expect(text).toContain(watched.version);
    await screenshot(page, 'software-matrix-wide');

    await page.goto(`${BASE_URL}/software/reflash`);
    await page.getByTestId('reflash-list').waitFor();
    await page.getByTestId('reflash-total').waitFor();
    const csv = page.waitForResponse((res) => res.url().includes('/api/software/reflash.csv'));
    await page.getByTestId('reflash-export').click();
    const answer = await csv;
    expect(answer.status()).toBe(200);
    expect(answer.headers()['content-type']).toContain('text/csv');
    await waitUntil('the export is saved', async () => ((await page.getByTestId('reflash-notice').textContent()) ?? '').startsWith('Saved '));
    await screenshot(page, 'software-reflash-wide');
  });
});
