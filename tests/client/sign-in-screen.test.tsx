import { fireEvent, screen, waitFor } from '@testing-library/react';
import { SignInScreen } from '@/components/auth/sign-in-screen';
import { safeNextPath } from '@/components/auth/safe-next';
import { sessionStore } from '@/hooks/api/session-store';
import { jsonResponse, renderWithProviders } from './support/render';

jest.mock('expo-router', () => {
  const { createElement } = jest.requireActual('react');
  return {
    Redirect: ({ href }: { href: string }) => createElement('span', { 'data-testid': 'redirect' }, href),
    useRouter: () => ({ replace: jest.fn(), push: jest.fn() }),
  };
});
jest.mock('expo-router/head', () => ({ __esModule: true, default: () => null }));

const fetchMock = jest.fn();

beforeEach(() => {
  sessionStore.clear();
  fetchMock.mockReset();
  global.fetch = fetchMock as unknown as typeof fetch;
});

function fillIn(testID: string, value: string) {
  fireEvent.change(screen.getByTestId(testID), { target: { value } });
}

describe('sign-in screen', () => {
  it('when the e-mail is empty, then it shows the field error and sends nothing', async () => {
    renderWithProviders(<SignInScreen />);
    fillIn('sign-in-password', 'a password');
    fireEvent.click(screen.getByTestId('sign-in-submit'));

    expect(await screen.findByText('Enter a valid e-mail address.')).toBeTruthy();
    expect(screen.getByLabelText('E-mail').getAttribute('aria-invalid')).toBe('true');
    expect(fetchMock).not.toHaveBeenCalled();
  });

  it('when the server refuses the password, then it shows its sentence, not a code', async () => {
    fetchMock.mockResolvedValueOnce(
      jsonResponse(401, {
        error: { code: 'auth/invalid-credentials', message: 'That e-mail and password do not match an account.' },
      }),
    );
    renderWithProviders(<SignInScreen />);
    fillIn('sign-in-email', '  Ana@Example.com ');
    fillIn('sign-in-password', 'wrong password');
    fireEvent.click(screen.getByTestId('sign-in-submit'));

    const error = await screen.findByTestId('sign-in-error');
    expect(error.textContent).toBe('That e-mail and password do not match an account.');
    expect(error.textContent).not.toContain('auth/');
    const [url, init] = fetchMock.mock.calls[0];
    expect(url).toBe('/api/auth/sign-in');
    expect(JSON.parse(init.body)).toEqual({ email: 'ana@example.com', password: 'wrong password' });
    expect(init.headers.Authorization).toBeUndefined();
    expect(sessionStore.getToken()).toBeNull();
  });

  it('when the network is down, then it says so in plain words', async () => {
    fetchMock.mockRejectedValueOnce(new TypeError('Failed to fetch'));
    renderWithProviders(<SignInScreen />);
    fillIn('sign-in-email', 'ana@example.com');
    fillIn('sign-in-password', 'a password');
    fireEvent.click(screen.getByTestId('sign-in-submit'));

    await waitFor(() =>
      expect(screen.getByTestId('sign-in-error').textContent).toBe('No connection. Check your network and try again.'),
    );
  });
});

describe('safeNextPath', () => {
  it.each([
    [undefined, '/'],
    ['/admin/users', '/admin/users'],
    ['/admin/programs?program=abc', '/admin/programs?program=abc'],
    ['https://evil.example', '/'],
    ['//evil.example', '/'],
    ['/\\evil.example', '/'],
    ['/sign-in?next=/x', '/'],
  ])('next=%s goes to %s', (next, expected) => {
    expect(safeNextPath(next)).toBe(expected);
  });
});
