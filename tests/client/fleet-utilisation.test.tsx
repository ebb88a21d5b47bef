import { screen, within } from '@testing-library/react';
import { UtilisationScreen } from '@/components/fleet/utilisation-screen';
import { TOKEN_KEY, sessionStore } from '@/hooks/api/session-store';
import type { Utilisation } from '@/shared/schemas/fleet';
import { STAGE_ID } from './support/assets';
import { me, routedFetch } from './support/findings';
import { renderWithProviders } from './support/render';

jest.mock('expo-router', () => ({ useRouter: () => ({ push: jest.fn() }), usePathname: () => '/fleet/utilisation' }));
jest.mock('expo-router/head', () => ({ __esModule: true, default: () => null }));

const LEAD = { id: '11111111-1111-4111-8111-000000000030', name: 'Mira Oduya' };
const DEFINITION = 'Hours assigned: the time each vehicle was held by an assignment, clipped to the period. Hours available: the whole period.';

// 30 days = 720 h available per vehicle; 13.58 h assigned is 1.9 %, 36 h is 5 %.
const answer: Utilisation = {
  from: '2026-11-01T00:00:00.000Z',
  to: '2026-12-01T00:00:00.000Z',
  definition: DEFINITION,
  vehicles: [
    { assetId: 'v1', tag: 'FW3-EP-013', stageId: STAGE_ID, stage: 'Early prototype', status: 'available', assignments: 3, assignedHours: 13.58, availableHours: 720, utilisation: 13.58 / 720 },
    { assetId: 'v2', tag: 'FW3-EP-014', stageId: STAGE_ID, stage: 'Early prototype', status: 'in-test', assignments: 4, assignedHours: 36, availableHours: 720, utilisation: 0.05 },
  ],
  stages: [{ stageId: STAGE_ID, stage: 'Early prototype', vehicles: 2, assignedHours: 49.58, availableHours: 1440, utilisation: 49.58 / 1440 }],
  total: { assignedHours: 49.58, availableHours: 1440, utilisation: 49.58 / 1440 },
};

beforeEach(() => {
  window.localStorage.setItem(TOKEN_KEY, 'token-1');
  sessionStore.reload();
});
afterEach(() => {
  window.localStorage.clear();
  sessionStore.clear();
});

describe('utilisation', () => {
  it('when the figures arrive, then the tables show hours assigned, hours available and the share per vehicle and per stage, with the definition', async () => {
    const fetchMock = routedFetch([
      { path: /\/api\/me$/, body: me(LEAD, 'lead') },
      { path: /\/api\/fleet\/utilisation\?/, body: answer },
    ]);
    global.fetch = fetchMock as unknown as typeof fetch;
    renderWithProviders(<UtilisationScreen />);

    const table = await screen.findByTestId('utilisation-table');
    const headers = within(table).getAllByRole('columnheader').map((h) => h.textContent);
    expect(headers).toEqual(['Vehicle', 'Assignments', 'Hours assigned', 'Hours available', 'Utilisation']);
    const cells = (id: string) => within(screen.getByTestId(`utilisation-table-row-${id}`)).getAllByRole('cell').map((c) => c.textContent);
    expect(cells('v1')).toEqual(['FW3-EP-013 (Early prototype)', '3', '13.6', '720', '1.9 %']);
    expect(cells('v2')).toEqual(['FW3-EP-014 (Early prototype)', '4', '36', '720', '5 %']);
    // Highest share first, as in the plot.
    expect(within(table).getAllByRole('row').map((r) => r.getAttribute('data-testid'))).toEqual([null, 'utilisation-table-row-v2', 'utilisation-table-row-v1']);

    const stageCells = within(screen.getByTestId(`utilisation-stage-table-row-${STAGE_ID}`)).getAllByRole('cell').map((c) => c.textContent);
    expect(stageCells).toEqual(['Early prototype', '2', '49.6', '1,440', '3.4 %']);
    expect(screen.getByTestId('utilisation-definition').textContent).toBe(DEFINITION);
    expect(screen.getByTestId('utilisation-plot-vehicles').textContent).toContain('Scale: 0 to 5 % of the hours available.');

    const url = String(fetchMock.mock.calls.find(([u]) => String(u).includes('/api/fleet/utilisation'))?.[0]);
    const params = new URL(url, 'http://localhost').searchParams;
    expect((Date.parse(params.get('to') ?? '') - Date.parse(params.get('from') ?? '')) / 86_400_000).toBeCloseTo(30, 0);
  });
});
