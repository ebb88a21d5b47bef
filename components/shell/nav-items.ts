import type { IconName } from '@/components/ui/icon';
import { FINDING_MEMBER_ROLES } from '@/shared/domain/finding-workflow';
import { ROLES, type Role } from '@/shared/schemas/auth';

export type NavItem = {
  href: string;
  label: string;
  icon: IconName;
  roles: readonly Role[];
};

/**
 * Every place the shell links to, in order. Features add their entry here. On a phone the first
 * four of a role's items stay in the tab bar and the rest go under More, so the order puts each
 * role's daily work first.
 */
export const NAV_ITEMS: readonly NavItem[] = [
  { href: '/', label: 'Home', icon: 'home', roles: ROLES },
  { href: '/assets', label: 'Assets', icon: 'assets', roles: ROLES },
  { href: '/findings', label: 'Findings', icon: 'warning', roles: FINDING_MEMBER_ROLES },
  { href: '/readiness', label: 'Readiness', icon: 'check', roles: ['lead', 'engineer', 'technician', 'coordinator'] },
  { href: '/validation', label: 'Validation', icon: 'check', roles: ['engineer', 'lead', 'technician'] },
  { href: '/software', label: 'Software', icon: 'download', roles: ['engineer', 'lead', 'technician'] },
  { href: '/fleet', label: 'Fleet', icon: 'programs', roles: ['coordinator', 'lead'] },
  { href: '/fleet/mine', label: 'My drives', icon: 'programs', roles: ['driver'] },
  { href: '/stages', label: 'Stages', icon: 'stages', roles: ['lead', 'engineer'] },
  { href: '/admin/users', label: 'Users', icon: 'users', roles: ['admin'] },
  { href: '/admin/programs', label: 'Programs', icon: 'programs', roles: ['admin'] },
];

export function navItemsFor(role: Role | null | undefined, items: readonly NavItem[] = NAV_ITEMS): NavItem[] {
  if (!role) return [];
  return items.filter((item) => item.roles.includes(role));
}

/** Home matches only itself; other items also match the pages beneath them. */
export function isActiveHref(href: string, pathname: string): boolean {
  if (href === '/') return pathname === '/';
  return pathname === href || pathname.startsWith(`${href}/`);
}

export function navTestID(item: Pick<NavItem, 'label'>): string {
  return `nav-${item.label.toLowerCase().replace(/\s+/g, '-')}`;
}
