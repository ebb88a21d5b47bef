import { fireEvent, screen, waitFor, within } from '@testing-library/react';
import { TestDetailScreen } from '@/components/validation/test-detail-screen';
import { ValidationPlanScreen } from '@/components/validation/validation-plan-screen';
import { TOKEN_KEY, sessionStore } from '@/hooks/api/session-store';
import { DEFAULT_GATE } from '@/shared/schemas/assets';
import type { Allocation, ValidationTest } from '@/shared/schemas/validation';
import { PROGRAM_ID, STAGE_ID } from './support/assets';
import { ASSET_ID, ENGINEER, TECH, me, routedFetch } from './support/findings';
import { renderWithProviders } from './support/render';

jest.mock('expo-router', () => ({ useRouter: () => ({ push: jest.fn(), replace: jest.fn(), setParams: jest.fn() }) }));
jest.mock('expo-router/head', () => ({ __esModule: true, default: () => null }));
jest.mock('expo-image-picker', () => ({}));

const BENCH_ID = '2c1d7f44-52e1-4c55-8c27-3a0bb6a4a001';
const stages = [
  { id: BENCH_ID, programId: PROGRAM_ID, name: 'Bench', position: 0, retired: false, gate: DEFAULT_GATE, minDriverLevel: 0, assetCount: 2, version: 0 },
  { id: STAGE_ID, programId: PROGRAM_ID, name: 'Early prototype', position: 2, retired: false, gate: DEFAULT_GATE, minDriverLevel: 0, assetCount: 4, version: 0 },
];
const ALLOCATION_ID = '5a5a5a5a-0000-4000-8000-000000000001';
const FINDING_ID = '3e3e3e3e-0000-4000-8000-0000000000f1';

function allocation(overrides: Partial<Allocation> = {}): Allocation {
  return {
    id: ALLOCATION_ID,
    testId: '9a9a9a9a-0000-4000-8000-000000000001',
    assetId: ASSET_ID,
    assetTag: 'FW3-EP-014',
    status: 'running',
    resultNotes: '',
    reportPhotoId: null,
    reportUrl: null,
    reportContentType: null,
    findingId: null,
    updatedAt: '2026-12-01T10:00:00.000Z',
    version: 2,
    ...overrides,
  };
}

function test(overrides: Partial<ValidationTest> = {}): ValidationTest {
  return {
    id: '9a9a9a9a-0000-4000-8000-000000000001',
    programId: PROGRAM_ID,
    stageId: STAGE_ID,
    stage: 'Early prototype',
    name: 'Damp heat cyclic',
    procedureRef: 'IEC 60068-2-30 Db',
    verifies: 'HV connectors keep their isolation.',
    reliability: 0.9,
    confidence: 0.9,
    testToLife: null,
    shape: null,
    requiredSamples: 22,
    requiredSamplesExact: 21.854,
    status: 'running',
    passedSamples: 1,
    demonstratedReliability: 0.1,
    allocations: [allocation(), allocation({ id: '5a5a5a5a-0000-4000-8000-000000000002', assetTag: 'FW3-EP-012', status: 'passed' })],
    version: 4,
    ...overrides,
  };
}

const benchTest = test({
  id: '9a9a9a9a-0000-4000-8000-000000000002',
  stageId: BENCH_ID,
  stage: 'Bench',
  name: 'Thermal shock',
  procedureRef: 'IEC 60068-2-14 Na',
  testToLife: 2,
  shape: 2,
  requiredSamples: 6,
  requiredSamplesExact: 5.46,
  status: 'planned',
  passedSamples: 0,
  allocations: [],
});

beforeEach(() => {
  window.localStorage.setItem(TOKEN_KEY, 'token-1');
  sessionStore.reload();
});
afterEach(() => {
  window.localStorage.clear();
  sessionStore.clear();
});

describe('the validation plan', () => {
  it('when it loads, then each stage lists its tests with targets in %, n with its value before rounding, and counts; a stage chip narrows it', async () => {
    global.fetch = routedFetch([
      { path: /\/api\/me$/, body: me(ENGINEER, 'engineer') },
      { path: /\/api\/stages\?/, body: { stages } },
      { path: /\/api\/validation\/tests\?programId=/, body: { tests: [test(), benchTest] } },
    ]) as unknown as typeof fetch;
    renderWithProviders(<ValidationPlanScreen />);
    const plan = await screen.findByTestId('validation-plan');
    const row = within(plan).getByTestId(`vtest-${test().id}`);
    expect(row.textContent).toContain('Damp heat cyclic');
    expect(row.textContent).toContain('IEC 60068-2-30 Db');
    expect(row.textContent).toContain('R 90 %');
    expect(row.textContent).toContain('n = 22');
    expect(row.textContent).toContain('21.85 before rounding up');
    expect(row.textContent).toContain('Running');
    expect(within(plan).getByTestId(`vtest-${benchTest.id}`).textContent).toContain('L 2');
    expect(screen.getByTestId('vtest-new')).toBeTruthy();

    fireEvent.click(screen.getByTestId(`validation-stage-${BENCH_ID}`));
    expect(screen.queryByTestId(`vtest-${test().id}`)).toBeNull();
    expect(screen.getByTestId(`vtest-${benchTest.id}`)).toBeTruthy();
  });
});

describe('allocations of a test', () => {
  it('when a technician marks a run failed with notes, then both are sent with the version and the finding it filed is linked', async () => {
    const failed = allocation({ status: 'failed', resultNotes: 'Water in the phase connector.', findingId: FINDING_ID, version: 3 });
    let current = test();
    const fetchMock = routedFetch([
      { path: /\/api\/me$/, body: me(TECH, 'technician') },
      { path: /\/api\/validation\/tests\/9a9a9a9a-0000-4000-8000-000000000001$/, body: () => current },
      {
        method: 'PATCH',
        path: new RegExp(`/api/validation/allocations/${ALLOCATION_ID}$`),
        body: () => {
          current = test({ status: 'failed', demonstratedReliability: null, allocations: [failed, current.allocations[1]] });
          return failed;
        },
      },
    ]);
    global.fetch = fetchMock as unknown as typeof fetch;
    renderWithProviders(<TestDetailScreen testId={test().id} />);
    await screen.findByTestId(`allocation-${ALLOCATION_ID}`);
    expect(screen.queryByTestId('allocate-asset')).toBeNull();
    expect(screen.queryByTestId('vtest-save')).toBeNull();
    expect(screen.getByTestId('vtest-n').textContent).toBe('n = 22 (21.85 before rounding up)');

    fireEvent.change(screen.getByTestId(`allocation-${ALLOCATION_ID}-notes`), { target: { value: 'Water in the phase connector.' } });
    fireEvent.click(screen.getByTestId(`allocation-${ALLOCATION_ID}-status-failed`));
    const link = await screen.findByTestId(`allocation-${ALLOCATION_ID}-finding`);
    expect(link.textContent).toBe('Finding filed');
    expect(link.getAttribute('href')).toBe(`/findings/${FINDING_ID}`);
    const patch = fetchMock.mock.calls.find(([, init]) => init?.method === 'PATCH');
    expect(JSON.parse(String((patch?.[1] as RequestInit).body))).toEqual({ status: 'failed', resultNotes: 'Water in the phase connector.', version: 2 });
  });

  it('when an engineer allocates an asset that is taken already, then the plain sentence shows', async () => {
    global.fetch = routedFetch([
      { path: /\/api\/me$/, body: me(ENGINEER, 'engineer') },
      { path: /\/api\/stages\?/, body: { stages } },
      { path: /\/api\/validation\/tests\/9a9a9a9a-0000-4000-8000-000000000001$/, body: test({ allocations: [] }) },
      {
        path: /\/api\/assets\?/,
        body: {
          items: [
            {
              id: ASSET_ID, programId: PROGRAM_ID, tag: 'FW3-EP-014', kind: 'vehicle', stageId: STAGE_ID, stage: 'Early prototype', status: 'in-test', location: 'Bay 4', vin: null, odometerKm: 0,
              updatedAt: '2026-12-01T10:00:00.000Z', checklist: { total: 0, done: 0, requiredTotal: 0, requiredDone: 0, deviations: 0 }, thumbnailUrl: null, cleared: true, notClearedReason: null,
            },
          ],
          nextCursor: null,
        },
      },
      {
        method: 'POST',
        path: /\/api\/validation\/tests\/9a9a9a9a-0000-4000-8000-000000000001\/allocations$/,
        status: 409,
        body: { error: { code: 'validation/already-allocated', message: 'validation/already-allocated' } },
      },
    ]) as unknown as typeof fetch;
    renderWithProviders(<TestDetailScreen testId={test().id} />);
    fireEvent.click(await screen.findByTestId('allocate-asset'));
    fireEvent.click(await screen.findByTestId('allocate-option-FW3-EP-014'));
    fireEvent.click(screen.getByTestId('allocate-submit'));
    await waitFor(() => expect(screen.getByTestId('allocate-error').textContent).toBe('This asset is already allocated to this test.'));
  });
});
