import { fireEvent, screen, within } from '@testing-library/react';
import { SoftwareMatrixScreen } from '@/components/software/software-matrix-screen';
import { TOKEN_KEY, sessionStore } from '@/hooks/api/session-store';
import type { SoftwareMatrix } from '@/shared/schemas/software';
import { PROGRAM_ID, STAGE_ID } from './support/assets';
import { ENGINEER, me, routedFetch } from './support/findings';
import { renderWithProviders } from './support/render';

jest.mock('expo-router', () => ({ useRouter: () => ({ push: jest.fn(), replace: jest.fn(), setParams: jest.fn() }) }));
jest.mock('expo-router/head', () => ({ __esModule: true, default: () => null }));

const FZC = 'e0000000-0000-4000-8000-000000000001';
const BCM = 'e0000000-0000-4000-8000-000000000002';

const matrix: SoftwareMatrix = {
  ecus: [
    { id: FZC, code: 'FZC', name: 'Front zone controller' },
    { id: BCM, code: 'BCM', name: 'Body controller' },
  ],
  baselines: [],
  rows: [
    {
      assetId: 'a0000000-0000-4000-8000-000000000005',
      tag: 'FW3-EP-005',
      kind: 'vehicle',
      stageId: STAGE_ID,
      stage: 'Early prototype',
      baselineId: null,
      cells: [
        { ecuId: FZC, installed: '4.1.0', target: '4.2.1', status: 'behind' },
        { ecuId: BCM, installed: 'B07_RC2', target: null, status: null },
      ],
      score: { onBaseline: 0, expected: 1 },
    },
  ],
  counts: { 'on-baseline': 10, behind: 1, ahead: 0, missing: 2, 'not-comparable': 0, 'rule-broken': 3 },
  totalAssets: 1,
  nextCursor: null,
};

beforeEach(() => {
  window.localStorage.setItem(TOKEN_KEY, 'token-1');
  sessionStore.reload();
});
afterEach(() => {
  window.localStorage.clear();
  sessionStore.clear();
});

function mount() {
  const fetchMock = routedFetch([
    { path: /\/api\/me$/, body: me(ENGINEER, 'engineer') },
    { path: /\/api\/stages\?/, body: { stages: [] } },
    { path: /\/api\/software\/matrix\?/, body: matrix },
  ]);
  global.fetch = fetchMock as unknown as typeof fetch;
  renderWithProviders(<SoftwareMatrixScreen />);
  return fetchMock;
}

describe('software matrix', () => {
  it('when a cell is behind its target, then the cell says "Behind" in words beside its version, not by colour alone', async () => {
    mount();
    const cell = await screen.findByTestId('matrix-cell-FW3-EP-005-FZC');
    expect(cell.textContent).toContain('4.1.0');
    expect(cell.textContent).toContain('Behind');
    expect(cell.getAttribute('aria-label')).toContain('FZC 4.1.0, Behind, target 4.2.1');
  });

  it('when a cell has no status, then it says "No target"', async () => {
    mount();
    const row = await screen.findByTestId('matrix-row-FW3-EP-005');
    expect(within(row).getByTestId('matrix-cell-FW3-EP-005-BCM').textContent).toContain('No target');
  });

  it('when a status count is pressed, then the matrix is asked again for that status only', async () => {
    const fetchMock = mount();
    const chip = await screen.findByTestId('status-count-rule-broken');
    expect(chip.textContent).toContain('Breaks a rule: 3');
    fireEvent.click(chip);
    await screen.findByTestId('software-matrix');
    const urls = fetchMock.mock.calls.map((call) => String(call[0]));
    expect(urls.some((url) => url.includes('/api/software/matrix?') && url.includes('status=rule-broken') && url.includes(`programId=${PROGRAM_ID}`))).toBe(true);
  });
});
