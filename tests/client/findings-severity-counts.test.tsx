import { fireEvent, render, screen, waitFor, within } from '@testing-library/react';
import { SeverityCounts } from '@/components/findings/severity-counts';
import { FindingsListScreen } from '@/components/findings/findings-list-screen';
import { TOKEN_KEY, sessionStore } from '@/hooks/api/session-store';
import { counts, finding, me, routedFetch, TECH } from './support/findings';
import { renderWithProviders } from './support/render';

const mockSetParams = jest.fn();
jest.mock('expo-router', () => ({
  useRouter: () => ({ push: jest.fn(), replace: jest.fn(), setParams: mockSetParams }),
}));
jest.mock('expo-router/head', () => ({ __esModule: true, default: () => null }));

beforeEach(() => {
  mockSetParams.mockReset();
  sessionStore.clear();
});

afterEach(() => window.localStorage.clear());

describe('severity counts', () => {
  it('when counts are given, then each chip shows the word and the number, never the colour alone', () => {
    render(<SeverityCounts counts={counts({ safety: 2, blocking: 5, major: 11, minor: 0 })} />);
    expect(screen.getByTestId('severity-count-safety').textContent).toBe('Safety2');
    expect(screen.getByTestId('severity-count-blocking').textContent).toBe('Blocking5');
    expect(screen.getByTestId('severity-count-major').textContent).toBe('Major11');
    expect(screen.getByTestId('severity-count-minor').textContent).toBe('Minor0');
    expect(screen.getByRole('button', { name: 'Safety, 2 open findings' })).toBeTruthy();
    expect(screen.getByRole('button', { name: 'Minor, 0 open findings' })).toBeTruthy();
  });

  it('when a chip is pressed, then it selects that severity, and pressing the selected one clears it', () => {
    const onSelect = jest.fn();
    const { rerender } = render(<SeverityCounts counts={counts({ major: 3 })} onSelect={onSelect} />);
    fireEvent.click(screen.getByTestId('severity-count-major'));
    expect(onSelect).toHaveBeenLastCalledWith('major');

    rerender(<SeverityCounts counts={counts({ major: 3 })} selected="major" onSelect={onSelect} />);
    expect(screen.getByTestId('severity-count-major').getAttribute('aria-pressed')).toBe('true');
    fireEvent.click(screen.getByTestId('severity-count-major'));
    expect(onSelect).toHaveBeenLastCalledWith(undefined);
  });
});

describe('findings list', () => {
  it('when the list answers, then the counts of the first page and one row per finding show, asked for with the default filters', async () => {
    window.localStorage.setItem(TOKEN_KEY, 'token-1');
    sessionStore.reload();
    const safety = finding({ id: '3e3e3e3e-0000-4000-8000-000000000002', title: 'Brake line chafing', severity: 'safety', blocksDriving: true });
    const minor = finding({ id: '3e3e3e3e-0000-4000-8000-000000000003', title: 'Trim clip missing', severity: 'minor' });
    const fetchMock = routedFetch([
      { path: /\/api\/me$/, body: me(TECH, 'technician') },
      { path: /\/api\/findings\?.*sort=updated/, body: { items: [], nextCursor: null, counts: counts() } },
      { path: /\/api\/findings\?/, body: { items: [safety, minor], nextCursor: null, counts: counts({ safety: 1, minor: 4 }) } },
    ]);
    global.fetch = fetchMock as unknown as typeof fetch;

    renderWithProviders(<FindingsListScreen params={{}} />);

    const list = await screen.findByTestId('findings-list');
    await waitFor(() => expect(within(list).getByTestId(`finding-row-${safety.id}`)).toBeTruthy());
    expect(within(list).getByTestId(`finding-row-${minor.id}`).textContent).toContain('Trim clip missing');
    expect(screen.getByTestId('severity-count-safety').textContent).toBe('Safety1');
    expect(screen.getByTestId('severity-count-minor').textContent).toBe('Minor4');
    expect(screen.getByTestId('severity-count-major').textContent).toBe('Major0');

    const listCall = fetchMock.mock.calls.map(([url]) => String(url)).find((url) => url.startsWith('/api/findings?') && !url.includes('sort=updated'));
    const query = new URLSearchParams(listCall?.split('?')[1]);
    expect(query.get('status')).toBe('active');
    expect(query.get('sort')).toBe('due');
    expect(query.get('dir')).toBe('asc');
    expect(query.get('mine')).toBeNull();

    fireEvent.click(screen.getByTestId('severity-count-safety'));
    expect(mockSetParams).toHaveBeenCalledWith(expect.objectContaining({ severity: 'safety' }));
  });
});
