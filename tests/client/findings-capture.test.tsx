import { fireEvent, screen, waitFor } from '@testing-library/react';
import { FindingCaptureScreen } from '@/components/findings/finding-capture-screen';
import { SAFETY_CAUTION } from '@/components/findings/finding-words';
import { TOKEN_KEY, sessionStore } from '@/hooks/api/session-store';
import { ASSET_ID, TECH, counts, finding, me, routedFetch } from './support/findings';
import { renderWithProviders } from './support/render';

const mockReplace = jest.fn();
jest.mock('expo-router', () => ({ useRouter: () => ({ push: jest.fn(), replace: mockReplace }) }));
jest.mock('expo-router/head', () => ({ __esModule: true, default: () => null }));
jest.mock('expo-image-picker', () => ({}));
jest.mock('expo-image-manipulator', () => ({ ImageManipulator: {}, SaveFormat: { JPEG: 'jpeg' } }));

beforeEach(() => {
  mockReplace.mockReset();
  window.localStorage.setItem(TOKEN_KEY, 'token-1');
  sessionStore.reload();
});
afterEach(() => {
  window.localStorage.clear();
  sessionStore.clear();
});

describe('filing a finding', () => {
  it('when safety is chosen, then the caution shows; on submit it posts with an Idempotency-Key and opens the finding', async () => {
    const filed = finding({ id: '3e3e3e3e-0000-4000-8000-0000000000aa', severity: 'safety', title: 'Brake line chafing', blocksDriving: true });
    const fetchMock = routedFetch([
      { path: /\/api\/me$/, body: me(TECH, 'technician') },
      { path: /\/api\/findings\?/, body: { items: [], nextCursor: null, counts: counts() } },
      { method: 'POST', path: /\/api\/findings$/, status: 201, body: filed },
    ]);
    global.fetch = fetchMock as unknown as typeof fetch;
    renderWithProviders(<FindingCaptureScreen params={{ assetId: ASSET_ID }} />);

    fireEvent.click(await screen.findByTestId('finding-submit'));
    expect(await screen.findByText('Enter a title.')).toBeTruthy();
    expect(screen.getByTestId('finding-severity-error').textContent).toBe('Choose how serious it is.');

    fireEvent.change(screen.getByTestId('finding-title'), { target: { value: 'Brake line chafing' } });
    expect(screen.queryByText(SAFETY_CAUTION)).toBeNull();
    fireEvent.click(screen.getByTestId('finding-severity-safety'));
    expect(screen.getByTestId('finding-safety-caution').textContent).toBe(SAFETY_CAUTION);
    expect(screen.getByTestId('finding-severity-safety').getAttribute('aria-checked')).toBe('true');

    fireEvent.click(screen.getByTestId('finding-submit'));
    await waitFor(() => expect(mockReplace).toHaveBeenCalledWith(`/findings/${filed.id}`));
    const post = fetchMock.mock.calls.find(([, init]) => init?.method === 'POST');
    expect(post).toBeTruthy();
    const init = post?.[1] as RequestInit;
    expect(JSON.parse(String(init.body))).toEqual({ assetId: ASSET_ID, title: 'Brake line chafing', severity: 'safety' });
    expect((init.headers as Record<string, string>)['Idempotency-Key']).toMatch(/^[0-9a-f-]{36}$/);
  });
});
