import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { Browser, Page } from 'playwright-core';
import { BASE_URL, launchBrowser, newPage, PHONE, screenshot, signIn, waitUntil, WIDE } from '../helpers/browser';
import { apiGet, apiToken, programId } from '../helpers/api';
import type { AssetSoftware, Ecu, ReflashEntry, ReflashList, SoftwareMatrix } from '../../shared/schemas/software';

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

describe('engineer on a phone', () => {
  it('when an engineer imports a one-row read-out on a phone, then the preview shows the change and the asset\'s card in the matrix shows the new version', async () => {
    const token = await apiToken('engineer@fenwater.example');
    const program = await programId(token, 'FW3');
    const { rows, ecus } = await wholeMatrix(token, program);
    const codes = new Set(ecus.map((e) => e.code));
    // A row of the sample read-out for an asset and ECU in the matrix, with a version no asset has.
    const [header, ...lines] = fs.readFileSync(SAMPLE, 'utf8').trim().split(/\r?\n/);
    const names = header.split(',');
    const line = lines.map((l) => l.split(',')).find((v) => rows.some((r) => r.tag === v[names.indexOf('asset_tag')]) && codes.has(v[names.indexOf('ecu')]));
    if (!line) throw new Error('no row of the sample read-out is in the demo matrix');
    const version = `7.7.${Date.now() % 100_000}`;
    line[names.indexOf('F189')] = version;
    const file = path.join(fs.mkdtempSync(path.join(os.tmpdir(), 'readout-')), 'phone-readout.csv');
    fs.writeFileSync(file, `${header}\n${line.join(',')}\n`);
    const tag = line[names.indexOf('asset_tag')];
    const ecu = line[names.indexOf('ecu')];

    const page = await newPage(browser, PHONE);
    await signIn(page, 'engineer@fenwater.example', 'proofyard-demo', '/software/import');
    await page.waitForURL(/\/software\/import/);
    const chooser = page.waitForEvent('filechooser');
    await page.getByTestId('import-file').click();
    await (await chooser).setFiles(file);
    const preview = page.getByTestId('import-preview');
    await preview.waitFor();
    await page.getByTestId('import-row-1').waitFor();
    expect(await page.getByTestId('import-row-1').textContent()).toContain(version);
    await screenshot(page, 'software-import-preview-phone');
    await page.getByTestId('import-apply').click();
    await page.getByTestId('import-done').waitFor();
    await expect(page.getByTestId('import-done').textContent()).resolves.toMatch(/^Imported: 1 ECU updated/);

    await page.goto(`${BASE_URL}/software`);
    await page.getByTestId('software-matrix').waitFor();
    expect(await cellText(page, `matrix-cell-${tag}-${ecu}`)).toContain(version);
    await page.getByTestId(`matrix-cell-${tag}-${ecu}`).first().scrollIntoViewIfNeeded();
    await screenshot(page, 'software-matrix-phone');
    await page.context().close();
  });
});

/** A local date and time as a `datetime-local` input holds it (the browser runs in this machine's zone). */
function localInput(date: Date): string {
  const pad = (n: number) => String(n).padStart(2, '0');
  return `${date.getFullYear()}-${pad(date.getMonth() + 1)}-${pad(date.getDate())}T${pad(date.getHours())}:${pad(date.getMinutes())}`;
}

/** The FW3 catalogue over the API, ordered by code. */
async function catalogue(token: string, program: string): Promise<Ecu[]> {
  return (await apiGet<{ items: Ecu[] }>(token, `/api/ecus?programId=${program}`)).items;
}

describe('ECU catalogue', () => {
  it('when an engineer edits an ECU on a wide screen, then the table shows it, and a code another ECU has is refused next to the field', async () => {
    const token = await apiToken('engineer@fenwater.example');
    const program = await programId(token, 'FW3');
    const [first, second] = await catalogue(token, program);
    const note = `Reflashed over the bench harness only (${Date.now().toString(36)}).`;

    const page = await newPage(browser, WIDE);
    await signIn(page, 'engineer@fenwater.example', 'proofyard-demo', '/software/baselines');
    await page.getByTestId('software-link-ecus').click();
    await page.waitForURL(/\/software\/ecus/);
    await page.getByTestId('ecu-table').waitFor();
    await page.getByTestId(`ecu-edit-${first.code}`).click();
    const form = `ecu-form-${first.code}`;
    await page.getByTestId(`${form}-notes`).fill(note);
    await page.getByTestId(`${form}-save`).click();
    await waitUntil('the save is confirmed', async () => ((await page.getByTestId('ecu-notice').textContent()) ?? '').includes(`${first.code} saved`));
    await expect(page.getByTestId(`ecu-row-${first.code}`).textContent()).resolves.toContain(note);
    expect((await catalogue(token, program)).find((e) => e.id === first.id)?.notes).toBe(note);

    await page.getByTestId(`ecu-edit-${first.code}`).click();
    await page.getByTestId(`${form}-code`).fill(second.code);
    await page.getByTestId(`${form}-save`).click();
    await page.getByTestId(`${form}-code-error`).waitFor();
    await expect(page.getByTestId(`${form}-code-error`).textContent()).resolves.toContain(`Another ECU of this program has the code ${second.code}`);
    await screenshot(page, 'software-ecus-wide');
    await page.getByTestId(`${form}-cancel`).click();
    expect((await catalogue(token, program)).find((e) => e.id === first.id)?.code).toBe(first.code);
  });

  it('when an engineer edits an ECU on a phone, then its card shows the change; a technician reads the catalogue without controls', async () => {
    const token = await apiToken('engineer@fenwater.example');
    const program = await programId(token, 'FW3');
    const ecu = (await catalogue(token, program))[1];
    const supplier = `Northmere Electronics ${Date.now().toString(36).slice(-4)}`;

    const page = await newPage(browser, PHONE);
    await signIn(page, 'engineer@fenwater.example', 'proofyard-demo', '/software/ecus');
    await page.getByTestId('ecu-list').waitFor();
    await page.getByTestId(`ecu-edit-${ecu.code}`).click();
    const form = `ecu-form-${ecu.code}`;
    await page.getByTestId(`${form}-supplier`).fill(supplier);
    await screenshot(page, 'software-ecus-form-phone');
    await page.getByTestId(`${form}-save`).click();
    await waitUntil('the card shows the supplier', async () => ((await page.getByTestId(`ecu-row-${ecu.code}`).textContent()) ?? '').includes(supplier));
    await screenshot(page, 'software-ecus-phone');

    const reader = await newPage(browser, PHONE);
    await signIn(reader, 'technician@fenwater.example', 'proofyard-demo', '/software/ecus');
    await reader.getByTestId('ecu-read-only').waitFor();
    await reader.getByTestId(`ecu-row-${ecu.code}`).waitFor();
    expect(await reader.getByTestId('ecu-add').count()).toBe(0);
    expect(await reader.getByTestId(`ecu-edit-${ecu.code}`).count()).toBe(0);
  });
});

describe('reflash list before a date, and recording flashes', () => {
  it('when an engineer on a phone keeps what is needed within a week and marks one flashed with hardware number, serial and time, then the list and the record show it', async () => {
    const token = await apiToken('engineer@fenwater.example');
    const program = await programId(token, 'FW3');
    const all = await apiGet<ReflashList>(token, `/api/software/reflash?programId=${program}`);

    const page = await newPage(browser, PHONE);
    await signIn(page, 'engineer@fenwater.example', 'proofyard-demo', '/software/reflash');
    await page.getByTestId('reflash-total').waitFor();
    await page.getByTestId('reflash-filters-toggle').click();
    await page.getByTestId('reflash-before-7').click();
    await page.waitForURL(/[?&]before=\d{4}-\d{2}-\d{2}/);
    const before = new URL(page.url()).searchParams.get('before')!;
    const week = await apiGet<ReflashList>(token, `/api/software/reflash?programId=${program}&before=${before}`);
    expect(week.items.length).toBeLessThanOrEqual(all.items.length);
    expect(week.items.length).toBeGreaterThan(0);
    expect(week.items.every((i) => i.neededBy !== null && i.neededBy < `${before}T23:59:59.999Z`)).toBe(true);
    await waitUntil('the total names the day', async () => ((await page.getByTestId('reflash-total').textContent()) ?? '').includes('needed by the end of'));
    await expect(page.getByTestId('reflash-total').textContent()).resolves.toMatch(new RegExp(`^${week.items.length} ECUs? to flash`));
    const entry: ReflashEntry = week.items.find((i) => i.flashTo) ?? week.items[0];
    const tid = `${entry.tag}-${entry.ecuCode}`;
    await expect(page.getByTestId(`reflash-needed-${tid}`).textContent()).resolves.toMatch(/^Needed (now|by)/);
    await screenshot(page, 'software-reflash-before-phone');

    // The filter lives in the address: a reload keeps it.
    await page.reload();
    await page.getByTestId(`reflash-entry-${tid}`).waitFor();
    await expect(page.getByTestId('reflash-filter-summary').textContent()).resolves.toContain('needed by');
    await page.getByTestId('reflash-filters-toggle').click();
    await expect(page.getByTestId('reflash-before').inputValue()).resolves.toBe(before);
    await page.getByTestId('reflash-filters-toggle').click();

    await page.getByTestId(`reflash-done-${tid}`).click();
    const form = `reflash-form-${tid}`;
    await page.getByTestId(`${form}-hardware-number`).fill('HW-7731-C');
    await page.getByTestId(`${form}-serial`).fill('SN-E2E-0042');
    await page.getByTestId(`${form}-time`).fill(localInput(new Date(Date.now() + 3 * 24 * 3600_000)));
    await page.getByTestId(`${form}-save`).click();
    await page.getByTestId(`${form}-time-error`).waitFor();
    await expect(page.getByTestId(`${form}-time-error`).textContent()).resolves.toContain('cannot be in the future');
    const flashedAt = new Date(Date.now() - 2 * 3600_000);
    await page.getByTestId(`${form}-time`).fill(localInput(flashedAt));
    await screenshot(page, 'software-reflash-flash-form-phone');
    await page.getByTestId(`${form}-save`).click();
    await waitUntil('the flash is recorded', async () => ((await page.getByTestId('reflash-notice').textContent()) ?? '').startsWith('Recorded:'));
    await waitUntil('the entry leaves the list', async () => (await page.getByTestId(`reflash-entry-${tid}`).count()) === 0);

    const software = await apiGet<AssetSoftware>(token, `/api/assets/${entry.assetId}/software`);
    const installed = software.ecus.find((e) => e.ecu.id === entry.ecuId)?.installed;
    expect(installed).toMatchObject({ softwareVersion: entry.flashTo, hardwareNumber: 'HW-7731-C', ecuSerial: 'SN-E2E-0042', source: 'manual' });
    expect(localInput(new Date(installed!.flashedAt))).toBe(localInput(flashedAt));

    // A validation test narrows it the same way.
    await page.getByTestId('reflash-filters-toggle').click();
    await page.getByTestId('reflash-test-toggle').click();
    await page.getByTestId('reflash-test').waitFor();
    await page.getByTestId('reflash-test').getByRole('radio').first().click();
    await page.waitForURL(/[?&]testId=/);
    await waitUntil('the total names the test', async () => ((await page.getByTestId('reflash-total').textContent()) ?? '').includes('allocated to'));
    await screenshot(page, 'software-reflash-test-phone');
  });

  it('when an engineer on a wide screen records a flash on the asset software tab with hardware number, serial and time, then the tab shows them', async () => {
    const token = await apiToken('engineer@fenwater.example');
    const program = await programId(token, 'FW3');
    const list = await apiGet<ReflashList>(token, `/api/software/reflash?programId=${program}`);
    const entry = [...list.items].reverse().find((i) => i.flashTo);
    if (!entry) throw new Error('the demo reflash list has no entry with a version to flash');

    const page = await newPage(browser, WIDE);
    await signIn(page, 'engineer@fenwater.example', 'proofyard-demo', `/assets/${entry.assetId}/software`);
    await page.getByTestId('asset-software').waitFor();
    await page.getByTestId(`asset-ecu-${entry.ecuCode}-record`).click();
    const form = `asset-ecu-${entry.ecuCode}-form`;
    await expect(page.getByTestId(`${form}-version`).inputValue()).resolves.toBe(entry.flashTo);
    await page.getByTestId(`${form}-software-number`).fill('SW-E2E-1');
    await page.getByTestId(`${form}-hardware-number`).fill('HW-5120-B');
    await page.getByTestId(`${form}-serial`).fill('SN-E2E-0077');
    const flashedAt = new Date(Date.now() - 26 * 3600_000);
    await page.getByTestId(`${form}-time`).fill(localInput(flashedAt));
    await screenshot(page, 'software-asset-flash-form-wide');
    await page.getByTestId(`${form}-save`).click();
    await waitUntil('the form closes', async () => (await page.getByTestId(form).count()) === 0);
    const card = page.getByTestId(`asset-ecu-${entry.ecuCode}`);
    await waitUntil('the card shows the numbers', async () => {
      const text = (await card.textContent()) ?? '';
      return text.includes('HW HW-5120-B') && text.includes('serial SN-E2E-0077');
    });
    await expect(page.getByTestId(`asset-ecu-${entry.ecuCode}-versions`).textContent()).resolves.toContain(`Installed ${entry.flashTo}`);
    await card.scrollIntoViewIfNeeded();
    await screenshot(page, 'software-asset-flash-wide');
    const software = await apiGet<AssetSoftware>(token, `/api/assets/${entry.assetId}/software`);
    const installed = software.ecus.find((e) => e.ecu.id === entry.ecuId)?.installed;
    expect(localInput(new Date(installed!.flashedAt))).toBe(localInput(flashedAt));
  });

  it('when the reflash list is filtered by a date on a wide screen, then only the entries needed by then show', async () => {
    const token = await apiToken('engineer@fenwater.example');
    const program = await programId(token, 'FW3');
    const page = await newPage(browser, WIDE);
    const day = new Date(Date.now() + 14 * 24 * 3600_000);
    const pad = (n: number) => String(n).padStart(2, '0');
    const before = `${day.getFullYear()}-${pad(day.getMonth() + 1)}-${pad(day.getDate())}`;
    await signIn(page, 'engineer@fenwater.example', 'proofyard-demo', '/software/reflash');
    await page.getByTestId('reflash-total').waitFor();
    await page.getByTestId('reflash-before').fill(before);
    await page.waitForURL(new RegExp(`[?&]before=${before}`));
    const expected = await apiGet<ReflashList>(token, `/api/software/reflash?programId=${program}&before=${before}`);
    expect(expected.items.length).toBeGreaterThan(0);
    await waitUntil('the list is filtered', async () =>
      ((await page.getByTestId('reflash-total').textContent()) ?? '').startsWith(`${expected.items.length} ECU`) &&
      ((await page.getByTestId('reflash-total').textContent()) ?? '').includes('needed by the end of'),
    );
    for (const item of expected.items.slice(0, 5)) await page.getByTestId(`reflash-entry-${item.tag}-${item.ecuCode}`).waitFor();
    const csv = page.waitForResponse((res) => res.url().includes('/api/software/reflash.csv'));
    await page.getByTestId('reflash-export').click();
    const answer = await csv;
    expect(new URL(answer.url()).searchParams.get('before')).toBe(before);
    expect(answer.status()).toBe(200);
    await screenshot(page, 'software-reflash-before-wide');
  });
});

describe('baseline editor', () => {
  it.each([
    ['a wide screen', WIDE, 'wide'],
    ['a phone', PHONE, 'phone'],
  ] as const)('when an engineer on %s starts a draft from the released baseline, a range that does not parse is refused at its field, and the draft is deleted after confirmation', async (_label, viewport, suffix) => {
    const token = await apiToken('engineer@fenwater.example');
    const program = await programId(token, 'FW3');
    const { stages } = await apiGet<{ stages: Array<{ id: string; name: string }> }>(token, `/api/stages?programId=${program}`);
    const early = stages.find((st) => st.name === 'Early prototype')!;
    const name = `E2E draft ${suffix} ${Date.now().toString(36)}`;

    const page = await newPage(browser, viewport);
    await signIn(page, 'engineer@fenwater.example', 'proofyard-demo', '/software/baselines');
    await page.getByTestId('baseline-new').click();
    await page.getByTestId(`baseline-new-stage-${early.id}`).click();
    await expect(page.getByTestId('baseline-new-supersedes').textContent()).resolves.toContain('When released, this draft supersedes');
    await page.getByTestId('baseline-new-name').fill(name);
    await screenshot(page, `software-baseline-new-${suffix}`);
    await page.getByTestId('baseline-new-save').click();
    await page.getByTestId('baseline-detail').waitFor();
    await expect(page.getByTestId('baseline-detail').textContent()).resolves.toContain(name);

    await page.getByTestId('baseline-edit').click();
    await page.getByTestId('baseline-rule-0-range').fill('>=3.1.0 <<4');
    await page.getByTestId('baseline-save').click();
    await page.getByTestId('baseline-rule-0-range-error').waitFor();
    await expect(page.getByTestId('baseline-rule-0-range-error').textContent()).resolves.toContain('does not parse');
    await page.getByTestId('baseline-rule-0-range').scrollIntoViewIfNeeded();
    await screenshot(page, `software-baseline-rule-error-${suffix}`);
    await page.getByTestId('baseline-rule-0-range').fill('>=3.2.0 <4');
    await page.getByTestId('baseline-save').click();
    await page.getByTestId('baseline-edit').waitFor();
    await expect(page.getByTestId('baseline-detail').textContent()).resolves.toContain('>=3.2.0 <4');

    await page.getByTestId('baseline-delete').click();
    await page.getByTestId('baseline-delete-confirm').waitFor();
    await page.getByTestId('baseline-delete-yes').click();
    await waitUntil('the draft is deleted', async () => ((await page.getByTestId('baseline-notice').textContent()) ?? '').includes('deleted'));
    const left = await apiGet<{ items: Array<{ name: string }> }>(token, `/api/baselines?programId=${program}`);
    expect(left.items.some((b) => b.name === name)).toBe(false);
  });
});
