import { fireEvent, screen, waitFor } from '@testing-library/react';
import { NewTestScreen } from '@/components/validation/test-detail-screen';
import { TOKEN_KEY, sessionStore } from '@/hooks/api/session-store';
import { DEFAULT_GATE } from '@/shared/schemas/assets';
import type { ValidationTest } from '@/shared/schemas/validation';
import { PROGRAM_ID, STAGE_ID } from './support/assets';
import { ENGINEER, me, routedFetch } from './support/findings';
import { renderWithProviders } from './support/render';

const mockReplace = jest.fn();
jest.mock('expo-router', () => ({ useRouter: () => ({ push: jest.fn(), replace: mockReplace, setParams: jest.fn() }) }));
jest.mock('expo-router/head', () => ({ __esModule: true, default: () => null }));
jest.mock('expo-image-picker', () => ({}));

const stage = { id: STAGE_ID, programId: PROGRAM_ID, name: 'Early prototype', position: 2, retired: false, gate: DEFAULT_GATE, minDriverLevel: 0, assetCount: 4, version: 0 };

function savedTest(overrides: Partial<ValidationTest> = {}): ValidationTest {
  return {
    id: '9a9a9a9a-0000-4000-8000-000000000001',
    programId: PROGRAM_ID,
    stageId: STAGE_ID,
    stage: 'Early prototype',
    name: 'Damp heat cyclic',
    procedureRef: 'IEC 60068-2-30 Db',
    verifies: '',
    reliability: 0.9,
    confidence: 0.9,
    testToLife: null,
    shape: null,
    requiredSamples: 22,
    requiredSamplesExact: 21.854,
    status: 'planned',
    passedSamples: 0,
    demonstratedReliability: null,
    allocations: [],
    version: 0,
    ...overrides,
  };
}

const type = (testID: string, value: string) => fireEvent.change(screen.getByTestId(testID), { target: { value } });
const n = () => screen.getByTestId('vtest-n').textContent;

beforeEach(() => {
  mockReplace.mockReset();
  window.localStorage.setItem(TOKEN_KEY, 'token-1');
  sessionStore.reload();
});
afterEach(() => {
  window.localStorage.clear();
  sessionStore.clear();
});

function mount(routes: Parameters<typeof routedFetch>[0] = []) {
  const fetchMock = routedFetch([
    { path: /\/api\/me$/, body: me(ENGINEER, 'engineer') },
    { path: /\/api\/stages\?/, body: { stages: [stage] } },
    ...routes,
  ]);
  global.fetch = fetchMock as unknown as typeof fetch;
  renderWithProviders(<NewTestScreen stageId={STAGE_ID} />);
  return fetchMock;
}

describe('the sample size on the test form', () => {
  it('when R 0.9 and C 0.9 are typed, then n = 22 shows with its value before rounding (ln 0.1 / ln 0.9 = 21.85; success-run relation, REFERENCES.md)', async () => {
    mount();
    await screen.findByTestId('vtest-reliability');
    type('vtest-reliability', '');
    type('vtest-confidence', '');
    expect(n()).toMatch(/Enter R and C/);
    type('vtest-reliability', '0.9');
    expect(n()).toMatch(/Enter R and C/);
    type('vtest-confidence', '0.9');
    expect(n()).toBe('n = 22 (21.85 before rounding up)');
    expect(screen.getByTestId('vtest-n-demonstrated').textContent).toContain('(1 − C)^(1/n) = 90.06 % at 90 % confidence');
  });

  it('when R 0.95, C 0.9, L 1 and b 1 are typed, then n = 45 shows (ln 0.1 / (1^1 ln 0.95) = 44.89; Weibayes extension, REFERENCES.md)', async () => {
    mount();
    await screen.findByTestId('vtest-reliability');
    type('vtest-reliability', '0.95');
    type('vtest-confidence', '0.9');
    expect(n()).toBe('n = 45 (44.89 before rounding up)');
    type('vtest-ttl', '1');
    expect(n()).toBe('Give the Weibull shape b with the test-to-life ratio.');
    type('vtest-shape', '1');
    expect(n()).toBe('n = 45 (44.89 before rounding up)');
    expect(screen.getByText(/n = ln\(1 − C\) \/ \(L\^b · ln R\), rounded up/)).toBeTruthy();
    type('vtest-ttl', '2');
    // L^b = 2 shortens the run: 44.89 / 2 = 22.45, so 23.
    expect(n()).toBe('n = 23 (22.45 before rounding up)');
  });

  it('when R is outside (0, 1) and Save is pressed, then the field says why and nothing is sent', async () => {
    const fetchMock = mount();
    await screen.findByTestId('vtest-reliability');
    type('vtest-name', 'Damp heat cyclic');
    type('vtest-reliability', '90');
    fireEvent.click(screen.getByTestId('vtest-save'));
    expect(await screen.findByTestId('vtest-reliability-error')).toBeTruthy();
    expect(screen.getByTestId('vtest-reliability-error').textContent).toBe('Must be between 0 and 1, both excluded (0.9 means 90 %).');
    expect(fetchMock.mock.calls.some(([, init]) => init?.method === 'POST')).toBe(false);
  });

  it('when a good test is saved, then numbers (not text) are posted and the new test opens', async () => {
    const created = savedTest();
    const fetchMock = mount([{ method: 'POST', path: /\/api\/validation\/tests$/, status: 201, body: created }]);
    await screen.findByTestId('vtest-reliability');
    type('vtest-name', 'Damp heat cyclic');
    type('vtest-procedure', 'IEC 60068-2-30 Db');
    type('vtest-reliability', '0,9');
    fireEvent.click(screen.getByTestId('vtest-save'));
    await waitFor(() => expect(mockReplace).toHaveBeenCalledWith(`/validation/tests/${created.id}`));
    const post = fetchMock.mock.calls.find(([, init]) => init?.method === 'POST');
    expect(JSON.parse(String((post?.[1] as RequestInit).body))).toEqual({
      stageId: STAGE_ID,
      name: 'Damp heat cyclic',
      procedureRef: 'IEC 60068-2-30 Db',
      verifies: '',
      reliability: 0.9,
      confidence: 0.9,
      testToLife: null,
      shape: null,
    });
  });
});
