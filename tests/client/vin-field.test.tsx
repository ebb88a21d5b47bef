import { act, fireEvent, screen, waitFor } from '@testing-library/react';
import { useState } from 'react';
import { AssetCreateScreen } from '@/components/assets/asset-create-screen';
import { VinField, checkDigitWarning, vinState } from '@/components/assets/vin-field';
import { sessionStore } from '@/hooks/api/session-store';
import { DEFAULT_GATE } from '@/shared/schemas/assets';
import { PROGRAM_ID, STAGE_ID } from './support/assets';
import { jsonResponse, renderWithProviders } from './support/render';

jest.mock('expo-router', () => ({ useRouter: () => ({ push: jest.fn(), replace: jest.fn() }) }));
jest.mock('expo-router/head', () => ({ __esModule: true, default: () => null }));

/** 49 CFR 565.15 worked example: 1M8GDM9AXKP042788 carries the check digit X. */
const VALID_VIN = '1M8GDM9AXKP042788';
const WRONG_CHECK_DIGIT = '1M8GDM9A1KP042788';

function Harness() {
  const [value, setValue] = useState('');
  const [left, setLeft] = useState(false);
  return <VinField value={value} onChangeText={setValue} onBlur={() => setLeft(true)} finished={left} testID="vin" />;
}

function type(testID: string, value: string) {
  fireEvent.change(screen.getByTestId(testID), { target: { value } });
}

describe('VIN field', () => {
  it('when the check digit is wrong, then it warns with the expected digit and keeps the VIN as typed', () => {
    renderWithProviders(<Harness />);
    type('vin', WRONG_CHECK_DIGIT.toLowerCase());

    const warning = screen.getByTestId('vin-warning');
    expect(warning.textContent).toBe(checkDigitWarning('X'));
    expect(warning.textContent).toContain('check digit should be X; kept as typed');
    expect((screen.getByTestId('vin') as HTMLInputElement).value).toBe(WRONG_CHECK_DIGIT);
    expect(screen.queryByTestId('vin-error')).toBeNull();
  });

  it('when the VIN is right, then it says so, with the model year', () => {
    renderWithProviders(<Harness />);
    type('vin', VALID_VIN);
    expect(screen.getByTestId('vin-ok').textContent).toBe('Check digit correct; model year 2019 or 1989.');
    expect(screen.queryByTestId('vin-warning')).toBeNull();
  });

  it('when a forbidden letter is typed, then the field shows the reason at once', () => {
    renderWithProviders(<Harness />);
    type('vin', '1M8GDM9AXKO');
    expect(screen.getByTestId('vin-error').textContent).toBe('The letters I, O and Q are never used in a VIN (found O at position 11).');
    expect(screen.getByLabelText('VIN').getAttribute('aria-invalid')).toBe('true');
  });

  it('a short VIN is in progress while typing and an error once the field is left', () => {
    renderWithProviders(<Harness />);
    type('vin', '1M8GDM');
    expect(screen.getByText('6 of 17 characters.')).toBeTruthy();
    fireEvent.blur(screen.getByTestId('vin'));
    expect(screen.getByTestId('vin-error').textContent).toBe('A VIN has 17 characters; this one has 6.');
  });

  it.each([
    ['', false, 'empty'],
    ['1M8 gdm', false, 'typing'],
    [VALID_VIN, false, 'valid'],
    [WRONG_CHECK_DIGIT, false, 'wrong-check-digit'],
    ['1M8GDM9AXKP04278', true, 'malformed'],
  ])('vinState(%j, finished=%s) is %s', (raw, finished, kind) => {
    expect(vinState(raw, finished).kind).toBe(kind);
  });
});

describe('new asset form', () => {
  const fetchMock = jest.fn();

  beforeEach(() => {
    fetchMock.mockReset();
    global.fetch = fetchMock as unknown as typeof fetch;
    sessionStore.setToken('test-token');
    fetchMock.mockImplementation(async (url: string) => {
      if (url === '/api/me') {
        return jsonResponse(200, {
          user: { id: 'u1', email: 'tech@fenwater.example', name: 'Tess Technician', role: 'technician', active: true },
          programs: [{ id: PROGRAM_ID, code: 'FW3', name: 'FW3 crossover' }],
        });
      }
      if (url.startsWith('/api/stages?')) {
        return jsonResponse(200, {
          stages: [
            { id: STAGE_ID, programId: PROGRAM_ID, name: 'Bench', position: 0, retired: false, gate: DEFAULT_GATE, minDriverLevel: 0, assetCount: 0, version: 0 },
          ],
        });
      }
      return jsonResponse(404, { error: { code: 'request/not-found', message: 'Not here.' } });
    });
  });

  afterEach(() => act(() => sessionStore.clear()));

  it('when the VIN is malformed, then the form refuses to send; a wrong check digit alone is only a warning', async () => {
    renderWithProviders(<AssetCreateScreen />);
    await screen.findByTestId('asset-form-tag');
    type('asset-form-tag', 'fw3-bn-001');
    fireEvent.click(screen.getByTestId('asset-form-stage-Bench'));
    type('asset-vin', '1M8GDM9AXKQ042788');
    fireEvent.click(screen.getByTestId('asset-form-submit'));

    await waitFor(() => expect(screen.getByTestId('asset-vin-error').textContent).toContain('Q at position 11'));
    expect(fetchMock.mock.calls.filter(([, init]) => init?.method === 'POST')).toHaveLength(0);

    type('asset-vin', WRONG_CHECK_DIGIT);
    expect((await screen.findByTestId('asset-vin-warning')).textContent).toContain('check digit should be X');
    fetchMock.mockImplementationOnce(async () => jsonResponse(400, { error: { code: 'request/invalid', message: 'x', details: { fields: { tag: 'Another asset already has this tag.' } } } }));
    fireEvent.click(screen.getByTestId('asset-form-submit'));

    await waitFor(() => expect(fetchMock.mock.calls.some(([, init]) => init?.method === 'POST')).toBe(true));
    const [, init] = fetchMock.mock.calls.find(([, call]) => call?.method === 'POST')!;
    expect(JSON.parse(init.body)).toMatchObject({ programId: PROGRAM_ID, tag: 'FW3-BN-001', stageId: STAGE_ID, vin: WRONG_CHECK_DIGIT, odometerKm: 0, buildDate: null });
    expect(await screen.findByText('Another asset already has this tag.')).toBeTruthy();
  });
});
