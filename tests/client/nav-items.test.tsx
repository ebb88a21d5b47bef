import { fireEvent, render, screen } from '@testing-library/react';
import { SafeAreaProvider } from 'react-native-safe-area-context';
import { TabBar } from '@/components/shell/app-shell';
import { NAV_ITEMS, isActiveHref, navItemsFor } from '@/components/shell/nav-items';
import type { Role } from '@/shared/schemas/auth';

const mockPush = jest.fn();
jest.mock('expo-router', () => ({
  useRouter: () => ({ push: mockPush }),
  usePathname: () => '/',
}));

const metrics = {
  frame: { x: 0, y: 0, width: 390, height: 844 },
  insets: { top: 0, left: 0, right: 0, bottom: 0 },
};

describe('navigation items', () => {
  it.each<[Role, string[]]>([
    ['technician', ['Home', 'Assets', 'Findings', 'Readiness', 'Validation', 'Software']],
    ['engineer', ['Home', 'Assets', 'Findings', 'Readiness', 'Validation', 'Software', 'Stages']],
    ['coordinator', ['Home', 'Assets', 'Findings', 'Readiness', 'Fleet']],
    ['driver', ['Home', 'Assets', 'Findings', 'My drives']],
    ['lead', ['Home', 'Assets', 'Findings', 'Readiness', 'Validation', 'Software', 'Fleet', 'Stages']],
    ['admin', ['Home', 'Assets', 'Users', 'Programs']],
  ])('a %s sees %j', (role, labels) => {
    expect(navItemsFor(role).map((item) => item.label)).toEqual(labels);
  });

  it('nobody signed in sees no items', () => {
    expect(navItemsFor(null)).toEqual([]);
  });

  it.each([
    ['/', '/', true],
    ['/', '/admin/users', false],
    ['/admin/users', '/admin/users', true],
    ['/admin/programs', '/admin/programs/abc', true],
    ['/admin/programs', '/admin/programs-old', false],
    ['/assets', '/assets/abc/checklist', true],
    ['/assets', '/', false],
  ])('%s is active on %s: %s', (href, pathname, active) => {
    expect(isActiveHref(href, pathname)).toBe(active);
  });

  it('the phone tab bar shows a technician four tabs and More, and marks Home as the current page', () => {
    render(
      <SafeAreaProvider initialMetrics={metrics}>
        <TabBar items={navItemsFor('technician')} pathname="/" />
      </SafeAreaProvider>,
    );
    const bar = screen.getByTestId('shell-phone');
    expect(bar.textContent).toBe('HomeAssetsFindingsReadinessMore');
    expect(screen.queryByTestId('nav-validation')).toBeNull();
    fireEvent.click(screen.getByTestId('nav-more'));
    expect(screen.getByTestId('nav-validation')).toBeTruthy();
    expect(screen.getByTestId('nav-software')).toBeTruthy();
    expect(screen.queryByTestId('nav-users')).toBeNull();
    expect(screen.getByTestId('nav-home').getAttribute('aria-current')).toBe('page');
    expect(screen.getByLabelText('Home')).toBeTruthy();
  });

  it('the phone tab bar gives an admin every item meant for admins', () => {
    render(
      <SafeAreaProvider initialMetrics={metrics}>
        <TabBar items={navItemsFor('admin')} pathname="/admin/users" />
      </SafeAreaProvider>,
    );
    for (const item of navItemsFor('admin')) expect(screen.getByTestId(`nav-${item.label.toLowerCase()}`)).toBeTruthy();
    expect(screen.queryByTestId('nav-stages')).toBeNull();
    expect(NAV_ITEMS.map((item) => item.href)).toContain('/stages');
    expect(screen.getByTestId('nav-users').getAttribute('aria-current')).toBe('page');
    expect(screen.getByTestId('nav-home').getAttribute('aria-current')).toBeNull();
  });

  it('a tab is a real link that navigates inside the app', () => {
    render(
      <SafeAreaProvider initialMetrics={metrics}>
        <TabBar items={navItemsFor('admin')} pathname="/" />
      </SafeAreaProvider>,
    );
    const programs = screen.getByTestId('nav-programs');
    expect(programs.tagName).toBe('A');
    expect(programs.getAttribute('href')).toBe('/admin/programs');
    fireEvent.click(programs);
    expect(mockPush).toHaveBeenCalledWith('/admin/programs');
  });
});
