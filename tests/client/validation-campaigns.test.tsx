import { fireEvent, screen, waitFor, within } from '@testing-library/react';
import { AssetCampaignsScreen } from '@/components/validation/asset-campaigns-screen';
import { TOKEN_KEY, sessionStore } from '@/hooks/api/session-store';
import type { AssetDetail } from '@/shared/schemas/assets';
import type { Campaign } from '@/shared/schemas/validation';
import { assetSummary, PROGRAM_ID } from './support/assets';
import { ASSET_ID, TECH, me, routedFetch } from './support/findings';
import { renderWithProviders } from './support/render';

jest.mock('expo-router', () => ({ useRouter: () => ({ push: jest.fn(), replace: jest.fn(), setParams: jest.fn() }) }));
jest.mock('expo-router/head', () => ({ __esModule: true, default: () => null }));
jest.mock('expo-image-picker', () => ({}));

const CAMPAIGN_ID = '4c4c4c4c-0000-4000-8000-000000000001';
const HUMID_ID = '4c4c4c4c-0000-4000-8000-0000000000a1';
const COLD_ID = '4c4c4c4c-0000-4000-8000-0000000000a2';

const asset: AssetDetail = {
  ...assetSummary({ id: ASSET_ID }),
  buildDate: null,
  notes: '',
  version: 1,
  vinCheck: null,
  stageHistory: [],
  photos: [],
  program: { id: PROGRAM_ID, code: 'FW3', name: 'FW3 crossover' },
};

function campaign(overrides: Partial<Campaign> = {}): Campaign {
  return {
    id: CAMPAIGN_ID,
    programId: PROGRAM_ID,
    assetId: ASSET_ID,
    assetTag: 'FW3-EP-014',
    name: 'Connector soak',
    kind: 'climate',
    startedAt: '2026-12-01T08:00:00.000Z',
    steps: [
      { id: HUMID_ID, name: 'Damp heat', durationHours: 24, distanceKm: null, temperatureC: 40, humidityPct: 85, route: null, doneHours: 12, doneKm: 0, dewPointC: 37.03, condensationRisk: null },
      {
        id: COLD_ID,
        name: 'Cold step',
        durationHours: 8,
        distanceKm: null,
        temperatureC: -10,
        humidityPct: null,
        route: null,
        doneHours: 0,
        doneKm: 0,
        dewPointC: null,
        condensationRisk: 'At -10 °C this step is below the 37 °C dew point of the earlier step "Damp heat": moisture taken up then can condense on the part.',
      },
    ],
    progress: { unit: 'hours', done: 12, planned: 32, fraction: 0.375, complete: false },
    currentStep: { id: HUMID_ID, name: 'Damp heat', index: 0 },
    projectedFinish: '2026-12-02T12:00:00.000Z',
    updatedAt: '2026-12-01T20:00:00.000Z',
    version: 3,
    ...overrides,
  };
}

const type = (testID: string, value: string) => fireEvent.change(screen.getByTestId(testID), { target: { value } });

beforeEach(() => {
  window.localStorage.setItem(TOKEN_KEY, 'token-1');
  sessionStore.reload();
});
afterEach(() => {
  window.localStorage.clear();
  sessionStore.clear();
});

function mount(campaigns: Campaign[], routes: Parameters<typeof routedFetch>[0] = []) {
  const fetchMock = routedFetch([
    { path: /\/api\/me$/, body: me(TECH, 'technician') },
    { path: new RegExp(`/api/assets/${ASSET_ID}/campaigns$`), body: { campaigns } },
    { path: new RegExp(`/api/assets/${ASSET_ID}$`), body: asset },
    ...routes,
  ]);
  global.fetch = fetchMock as unknown as typeof fetch;
  renderWithProviders(<AssetCampaignsScreen assetId={ASSET_ID} />);
  return fetchMock;
}

describe('test campaigns on an asset', () => {
  it('when a cold step follows a humid one in the form, then the condensation caution shows on the cold step only (Magnus, Alduchov and Eskridge 1996: 30 °C at 90 % RH has a 28.2 °C dew point)', async () => {
    mount([]);
    fireEvent.click(await screen.findByTestId('campaign-new'));
    type('campaign-form-step-0-name', 'Humid');
    type('campaign-form-step-0-hours', '24');
    type('campaign-form-step-0-temperature', '30');
    type('campaign-form-step-0-humidity', '90');
    expect(screen.getByTestId('campaign-form-step-0-dew-point').textContent).toBe('Dew point 28.2 °C');
    fireEvent.click(screen.getByTestId('campaign-form-add-step'));
    type('campaign-form-step-1-name', 'Cold');
    type('campaign-form-step-1-temperature', '35');
    expect(screen.queryByTestId('campaign-form-step-1-caution')).toBeNull();
    type('campaign-form-step-1-temperature', '5');
    const caution = screen.getByTestId('campaign-form-step-1-caution');
    expect(caution.textContent).toContain('Condensation risk.');
    expect(caution.textContent).toContain('At 5 °C this step is below the 28.2 °C dew point of the earlier step "Humid"');
    expect(screen.queryByTestId('campaign-form-step-0-caution')).toBeNull();
    type('campaign-form-step-1-temperature', '-10');
    expect(screen.getByTestId('campaign-form-step-1-caution').textContent).toContain('the frost point over ice differs by about a degree');
  });

  it('when a saved campaign has a cold step after a humid one, then that step carries the caution, and progress, the running step and the finish show', async () => {
    mount([campaign()]);
    const card = await screen.findByTestId(`campaign-${CAMPAIGN_ID}`);
    expect(within(card).getByTestId('campaign-progress').textContent).toContain('12 h of 32 h done (38 %)');
    expect(within(card).getByTestId('campaign-current-step').textContent).toBe('Now: Damp heat (step 1 of 2)');
    expect(within(card).getByTestId('campaign-finish').textContent).toMatch(/Projected finish 2 Dec 2026/);
    expect(screen.queryByTestId(`campaign-step-${HUMID_ID}-caution`)).toBeNull();
    expect(screen.getByTestId(`campaign-step-${COLD_ID}-caution`).textContent).toContain('below the 37 °C dew point of the earlier step "Damp heat"');
    expect(screen.getByTestId(`campaign-step-${HUMID_ID}`).textContent).toContain('dew point 37 °C');
    expect(card.textContent).toContain('Below 0 °C the frost point over ice differs from this value by about a degree.');
  });

  it('when a log has bad rows, then each is listed by line and nothing is recorded', async () => {
    const fetchMock = mount([campaign()], [
      {
        method: 'POST',
        path: new RegExp(`/api/campaigns/${CAMPAIGN_ID}/log$`),
        status: 400,
        body: {
          error: {
            code: 'campaign/log-invalid',
            message: 'csv: line 3: No step named "Damp" in this campaign. Nothing was recorded.',
            details: { fields: { csv: '1 bad row; nothing was recorded.' }, lines: [{ line: 3, message: 'No step named "Damp" in this campaign.' }] },
          },
        },
      },
    ]);
    await screen.findByTestId('campaign-log-input');
    type('campaign-log-input', 'step,hours,km\nDamp heat,2,\nDamp,1,\n');
    fireEvent.click(screen.getByTestId('campaign-log-submit'));
    const errors = await screen.findByTestId('campaign-log-errors');
    expect(errors.textContent).toBe('Line 3: No step named "Damp" in this campaign.');
    expect(screen.getByText('One row could not be read, so nothing was recorded. Correct it and import again.')).toBeTruthy();
    const post = fetchMock.mock.calls.find(([, init]) => init?.method === 'POST');
    const init = post?.[1] as RequestInit;
    expect(JSON.parse(String(init.body))).toEqual({ csv: 'step,hours,km\nDamp heat,2,\nDamp,1,\n' });
    expect((init.headers as Record<string, string>)['Idempotency-Key']).toMatch(/^[0-9a-f-]{36}$/);
    expect((screen.getByTestId('campaign-log-input') as HTMLTextAreaElement).value).toBe('step,hours,km\nDamp heat,2,\nDamp,1,\n');
  });

  it('when hours done are recorded on a step, then the total is posted for that step', async () => {
    const after = campaign();
    after.steps[0] = { ...after.steps[0], doneHours: 20 };
    const fetchMock = mount([campaign()], [{ method: 'POST', path: new RegExp(`/api/campaigns/${CAMPAIGN_ID}/progress$`), body: after }]);
    await screen.findByTestId(`campaign-step-${HUMID_ID}-done`);
    type(`campaign-step-${HUMID_ID}-done`, '20');
    fireEvent.click(screen.getByTestId(`campaign-step-${HUMID_ID}-record`));
    await waitFor(() => expect(screen.getByText('Recorded.')).toBeTruthy());
    const post = fetchMock.mock.calls.find(([, init]) => init?.method === 'POST');
    expect(JSON.parse(String((post?.[1] as RequestInit).body))).toEqual({ stepId: HUMID_ID, doneHours: 20 });
  });
});
