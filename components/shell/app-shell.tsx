import { usePathname } from 'expo-router';
import { useEffect, useState, type ReactNode } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';
import { useSafeAreaInsets } from 'react-native-safe-area-context';
import { Button } from '@/components/ui/button';
import { Badge } from '@/components/ui/chip';
import { Icon } from '@/components/ui/icon';
import { LinkPressable } from '@/components/ui/link-pressable';
import { Text } from '@/components/ui/text';
import { useFocusRing } from '@/components/ui/use-focus-ring';
import { colors, radii, sizes, spacing } from '@/components/theme/tokens';
import { useBreakpoints } from '@/hooks/use-breakpoints';
import { useSession } from '@/hooks/use-session';
import { ROLE_LABELS } from '@/shared/schemas/auth';
import { isActiveHref, navItemsFor, navTestID, type NavItem } from './nav-items';
import { ProgramSwitcher } from './program-switcher';
import { Wordmark } from './wordmark';

/** Phone: a top bar and a bottom tab bar. Wide (>= 1024 px): a 240 px side navigation. */
export function AppShell({ children }: { children: ReactNode }) {
  const { isWide } = useBreakpoints();
  const pathname = usePathname();
  const { user } = useSession();
  const items = navItemsFor(user?.role);

  if (isWide) {
    return (
      <View style={styles.wideRoot}>
        <SideNav items={items} pathname={pathname} />
        <View style={styles.main} role="main">
          {children}
        </View>
      </View>
    );
  }
  return (
    <View style={styles.phoneRoot}>
      <PhoneTopBar />
      <View style={styles.main} role="main">
        {children}
      </View>
      <TabBar items={items} pathname={pathname} />
    </View>
  );
}

export function SideNav({ items, pathname }: { items: readonly NavItem[]; pathname: string }) {
  const { user, signOut } = useSession();
  return (
    <View style={styles.side} role="navigation" aria-label="Main" testID="shell-wide">
      <View style={styles.sideTop}>
        <Wordmark />
        <ProgramSwitcher layout="list" />
        <View style={styles.sideItems}>
          {items.map((item) => (
            <SideNavLink key={item.href} item={item} active={isActiveHref(item.href, pathname)} />
          ))}
        </View>
      </View>
      <View style={styles.sideBottom}>
        {user ? (
          <View style={styles.userBox}>
            <Text variant="bodyStrong" numberOfLines={1}>
              {user.name}
            </Text>
            <Text variant="caption" tone="muted" numberOfLines={1}>
              {ROLE_LABELS[user.role]}
            </Text>
          </View>
        ) : null}
        <Button label="Sign out" icon="logout" variant="ghost" compact onPress={signOut} testID="shell-sign-out" />
      </View>
    </View>
  );
}

function SideNavLink({ item, active }: { item: NavItem; active: boolean }) {
  const ring = useFocusRing();
  return (
    <LinkPressable
      href={item.href}
      testID={navTestID(item)}
      accessibilityLabel={item.label}
      onFocus={ring.onFocus}
      onBlur={ring.onBlur}
      style={({ pressed }) => [
        styles.sideLink,
        active && styles.sideLinkActive,
        pressed && !active && styles.sideLinkPressed,
        ring.focused && styles.focused,
      ]}
      webAttributes={{ 'aria-current': active ? 'page' : undefined }}
    >
      <View style={[styles.sideIndicator, active && styles.sideIndicatorActive]} />
      <Icon name={item.icon} color={active ? colors.primary : colors.textMuted} />
      <Text variant="bodyStrong" tone={active ? 'primary' : 'default'}>
        {item.label}
      </Text>
    </LinkPressable>
  );
}

function PhoneTopBar() {
  const insets = useSafeAreaInsets();
  const { currentProgram } = useSession();
  return (
    <View style={[styles.topBar, { paddingTop: insets.top }]} role="banner">
      <Wordmark />
      {currentProgram ? <CurrentProgramLink code={currentProgram.code} name={currentProgram.name} /> : null}
    </View>
  );
}

/** On a phone the switcher lives on Home; the top bar shows the program and leads there. */
function CurrentProgramLink({ code, name }: { code: string; name: string }) {
  const ring = useFocusRing();
  return (
    <LinkPressable
      href="/"
      accessibilityLabel={`Current program ${code}, ${name}. Change it on Home`}
      testID="shell-current-program"
      onFocus={ring.onFocus}
      onBlur={ring.onBlur}
      style={({ pressed }) => [styles.programLink, pressed && styles.tabPressed, ring.focused && styles.focused]}
    >
      <Badge label={code} tone="primary" />
      <Icon name="switch" size={sizes.iconSm} color={colors.textMuted} />
    </LinkPressable>
  );
}

/** A phone fits five tabs: with more, the first four stay and the rest move under "More". */
const MAX_TABS = 5;

export function TabBar({ items, pathname }: { items: readonly NavItem[]; pathname: string }) {
  const insets = useSafeAreaInsets();
  const [moreOpen, setMoreOpen] = useState(false);
  const overflow = items.length > MAX_TABS;
  const shown = overflow ? items.slice(0, MAX_TABS - 1) : items;
  const rest = overflow ? items.slice(MAX_TABS - 1) : [];
  const restActive = rest.some((item) => isActiveHref(item.href, pathname));
  useEffect(() => setMoreOpen(false), [pathname]);
  return (
    <View role="navigation" aria-label="Main" testID="shell-phone">
      {moreOpen ? (
        <View style={styles.moreSheet} testID="nav-more-sheet">
          {rest.map((item) => (
            <SideNavLink key={item.href} item={item} active={isActiveHref(item.href, pathname)} />
          ))}
        </View>
      ) : null}
      <View style={[styles.tabBar, { paddingBottom: insets.bottom }]}>
        {shown.map((item) => (
          <TabLink key={item.href} item={item} active={isActiveHref(item.href, pathname)} />
        ))}
        {overflow ? <MoreTab active={restActive || moreOpen} expanded={moreOpen} onPress={() => setMoreOpen((open) => !open)} /> : null}
      </View>
    </View>
  );
}

function MoreTab({ active, expanded, onPress }: { active: boolean; expanded: boolean; onPress: () => void }) {
  const ring = useFocusRing();
  return (
    <Pressable
      onPress={onPress}
      testID="nav-more"
      accessibilityRole="button"
      accessibilityLabel="More"
      accessibilityState={{ expanded }}
      onFocus={ring.onFocus}
      onBlur={ring.onBlur}
      style={({ pressed }) => [styles.tab, pressed && styles.tabPressed, ring.focused && styles.focused]}
    >
      <View style={[styles.tabIcon, active && styles.tabIconActive]}>
        <Icon name={expanded ? 'arrow-up' : 'chevron-down'} color={active ? colors.primary : colors.textMuted} />
      </View>
      <Text variant="caption" weight={active ? 'semibold' : 'medium'} tone={active ? 'primary' : 'muted'} numberOfLines={1}>
        More
      </Text>
    </Pressable>
  );
}

function TabLink({ item, active }: { item: NavItem; active: boolean }) {
  const ring = useFocusRing();
  return (
    <LinkPressable
      href={item.href}
      testID={navTestID(item)}
      accessibilityLabel={item.label}
      onFocus={ring.onFocus}
      onBlur={ring.onBlur}
      style={({ pressed }) => [styles.tab, pressed && styles.tabPressed, ring.focused && styles.focused]}
      webAttributes={{ 'aria-current': active ? 'page' : undefined }}
    >
      <View style={[styles.tabIcon, active && styles.tabIconActive]}>
        <Icon name={item.icon} color={active ? colors.primary : colors.textMuted} />
      </View>
      <Text variant="caption" weight={active ? 'semibold' : 'medium'} tone={active ? 'primary' : 'muted'} numberOfLines={1}>
        {item.label}
      </Text>
    </LinkPressable>
  );
}

const styles = StyleSheet.create({
  wideRoot: {
    flex: 1,
    flexDirection: 'row',
    backgroundColor: colors.bg,
  },
  phoneRoot: {
    flex: 1,
    backgroundColor: colors.bg,
  },
  main: {
    flex: 1,
    minWidth: 0,
    minHeight: 0,
  },
  side: {
    width: sizes.sideNav,
    backgroundColor: colors.surface,
    borderRightWidth: 1,
    borderRightColor: colors.border,
    paddingHorizontal: spacing.lg,
    paddingVertical: spacing.xl,
    justifyContent: 'space-between',
    gap: spacing.xl,
  },
  sideTop: {
    gap: spacing.xl,
  },
  sideItems: {
    gap: spacing.xs,
  },
  sideLink: {
    minHeight: sizes.touch,
    flexDirection: 'row',
    alignItems: 'center',
    gap: spacing.md,
    paddingRight: spacing.md,
    borderRadius: radii.md,
    overflow: 'hidden',
  },
  sideLinkActive: {
    backgroundColor: colors.primaryTint,
  },
  sideLinkPressed: {
    backgroundColor: colors.surfaceMuted,
  },
  sideIndicator: {
    width: spacing.xs,
    alignSelf: 'stretch',
    backgroundColor: 'transparent',
  },
  sideIndicatorActive: {
    backgroundColor: colors.accent,
  },
  sideBottom: {
    gap: spacing.sm,
    borderTopWidth: 1,
    borderTopColor: colors.border,
    paddingTop: spacing.lg,
  },
  userBox: {
    gap: spacing.xxs,
  },
  topBar: {
    backgroundColor: colors.surface,
    borderBottomWidth: 1,
    borderBottomColor: colors.border,
    paddingHorizontal: spacing.lg,
    minHeight: sizes.topBar,
    flexDirection: 'row',
    alignItems: 'center',
    justifyContent: 'space-between',
  },
  programLink: {
    minHeight: sizes.touch,
    flexDirection: 'row',
    alignItems: 'center',
    gap: spacing.xs,
    paddingHorizontal: spacing.xs,
    borderRadius: radii.md,
  },
  moreSheet: {
    backgroundColor: colors.surface,
    borderTopWidth: 1,
    borderTopColor: colors.border,
    paddingHorizontal: spacing.lg,
    paddingVertical: spacing.sm,
    gap: spacing.xs,
  },
  tabBar: {
    flexDirection: 'row',
    backgroundColor: colors.surface,
    borderTopWidth: 1,
    borderTopColor: colors.border,
    minHeight: sizes.tabBar,
  },
  tab: {
    flex: 1,
    minHeight: sizes.tabBar,
    minWidth: sizes.touch,
    alignItems: 'center',
    justifyContent: 'center',
    gap: spacing.xxs,
    paddingVertical: spacing.xs,
  },
  tabPressed: {
    backgroundColor: colors.surfaceMuted,
  },
  tabIcon: {
    paddingHorizontal: spacing.lg,
    paddingVertical: spacing.xxs,
    borderRadius: radii.pill,
  },
  tabIconActive: {
    backgroundColor: colors.primaryTint,
  },
  focused: {
    outlineColor: colors.focus,
    outlineStyle: 'solid',
    outlineWidth: sizes.focusRing,
    outlineOffset: -sizes.focusRing,
  },
});
