import { fireEvent, screen, within } from '@testing-library/react';
import { SoftwareImportScreen } from '@/components/software/software-import-screen';
import { TOKEN_KEY, sessionStore } from '@/hooks/api/session-store';
import type { ImportPreview, ImportRow } from '@/shared/schemas/software';
import { ENGINEER, me, routedFetch } from './support/findings';
import { renderWithProviders } from './support/render';

jest.mock('expo-router', () => ({ useRouter: () => ({ push: jest.fn(), replace: jest.fn(), setParams: jest.fn() }) }));
jest.mock('expo-router/head', () => ({ __esModule: true, default: () => null }));

const values = (softwareVersion: string) => ({ softwareVersion, softwareNumber: '', hardwareNumber: '', ecuSerial: '' });
const row = (overrides: Partial<ImportRow>): ImportRow => ({
  row: 1,
  outcome: 'change',
  reasons: [],
  assetId: 'a0000000-0000-4000-8000-000000000005',
  tag: 'FW3-EP-005',
  vin: null,
  ecuId: 'e0000000-0000-4000-8000-000000000001',
  ecuCode: 'FZC',
  before: values('4.1.0'),
  after: values('4.2.1'),
  changes: ['softwareVersion'],
  status: 'on-baseline',
  ...overrides,
});

const preview: ImportPreview = {
  rows: [
    row({}),
    row({ row: 2, outcome: 'unknown', reasons: ['No asset FW3-EP-099 in this program.'], assetId: null, tag: 'FW3-EP-099', before: null, after: null, changes: [], status: null }),
    row({ row: 3, outcome: 'unknown', reasons: ['No ECU XYZ in this program.'], ecuId: null, ecuCode: 'XYZ', before: null, after: null, changes: [], status: null }),
  ],
  summary: { change: 1, unchanged: 0, unknown: 2, invalid: 0 },
  columns: { tag: 'asset_tag', ecu: 'ecu', softwareVersion: 'F189' },
};

beforeEach(() => {
  window.localStorage.setItem(TOKEN_KEY, 'token-1');
  sessionStore.reload();
});
afterEach(() => {
  window.localStorage.clear();
  sessionStore.clear();
});

describe('import of a read-out', () => {
  it('when the preview has unknown rows, then each is shown as unknown with its reason and nothing is applied yet', async () => {
    const fetchMock = routedFetch([
      { path: /\/api\/me$/, body: me(ENGINEER, 'engineer') },
      { method: 'POST', path: /\/api\/software\/import\/preview$/, body: preview },
    ]);
    global.fetch = fetchMock as unknown as typeof fetch;
    renderWithProviders(<SoftwareImportScreen />);
    await screen.findByText(/Try the sample read-out from the demo/);
    fireEvent.change(await screen.findByTestId('import-paste'), {
      target: { value: 'asset_tag,ecu,F189\nFW3-EP-005,FZC,4.2.1\nFW3-EP-099,FZC,4.2.1\nFW3-EP-009,XYZ,1.0.0' },
    });
    fireEvent.click(screen.getByTestId('import-paste-preview'));

    await screen.findByTestId('import-preview');
    const unknownAsset = screen.getByTestId('import-row-2');
    expect(within(unknownAsset).getByText('Unknown')).toBeTruthy();
    expect(unknownAsset.textContent).toContain('No asset FW3-EP-099 in this program.');
    expect(screen.getByTestId('import-row-3').textContent).toContain('No ECU XYZ in this program.');
    expect(screen.getByTestId('import-row-1').textContent).toContain('4.1.0 → 4.2.1');
    expect(screen.getByTestId('import-skip-invalid')).toBeTruthy();

    const sent = fetchMock.mock.calls.find((call) => String(call[0]).endsWith('/api/software/import/preview'));
    const body = JSON.parse(String(sent?.[1]?.body)) as { rows: Array<Record<string, string>> };
    expect(body.rows[1]).toEqual({ asset_tag: 'FW3-EP-099', ecu: 'FZC', F189: '4.2.1' });
    expect(fetchMock.mock.calls.some((call) => String(call[0]).includes('/import/apply'))).toBe(false);
  });
});
