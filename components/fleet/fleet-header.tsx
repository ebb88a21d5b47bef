import { usePathname } from 'expo-router';
import type { ReactNode } from 'react';
import { StyleSheet, View } from 'react-native';
import { LinkPressable } from '@/components/ui/link-pressable';
import { PageTitle } from '@/components/ui/page-title';
import { Notice } from '@/components/ui/states';
import { Heading, Text } from '@/components/ui/text';
import { useFocusRing } from '@/components/ui/use-focus-ring';
import { colors, radii, sizes, spacing } from '@/components/theme/tokens';
import { useSession } from '@/hooks/use-session';
import { ROAD_USE_CAUTION } from '@/shared/schemas/fleet';
import { isFleetManager } from './fleet-words';

const SECTIONS = [
  { href: '/fleet', label: 'Plan' },
  { href: '/fleet/new', label: 'Book' },
  { href: '/fleet/drivers', label: 'Drivers' },
  { href: '/fleet/proposals', label: 'Proposals' },
  { href: '/fleet/utilisation', label: 'Utilisation' },
] as const;

/** The driving pages say this (PRODUCT.md section 6). */
export function RoadCaution() {
  return <Notice tone="warning" message={ROAD_USE_CAUTION} testID="road-caution" />;
}

/** Page title, the program, and for coordinators and leads the fleet's sections as links. */
export function FleetHeader({ title, subtitle, actions }: { title: string; subtitle?: string; actions?: ReactNode }) {
  const { user, currentProgram } = useSession();
  const pathname = usePathname();
  return (
    <View style={styles.header}>
      <PageTitle title={title} />
      <View style={styles.titleRow}>
        <View style={styles.titleText}>
          <Heading level={1} variant="title">
            {title}
          </Heading>
          <Text tone="muted">{subtitle ?? (currentProgram ? `${currentProgram.code} · ${currentProgram.name}` : '')}</Text>
        </View>
        {actions ? <View style={styles.actions}>{actions}</View> : null}
      </View>
      {isFleetManager(user?.role) ? (
        <View role="navigation" aria-label="Fleet" style={styles.sections} testID="fleet-sections">
          {SECTIONS.map((section) => (
            <SectionLink key={section.href} href={section.href} label={section.label} active={pathname === section.href} />
          ))}
        </View>
      ) : null}
    </View>
  );
}

function SectionLink({ href, label, active }: { href: string; label: string; active: boolean }) {
  const ring = useFocusRing();
  return (
    <LinkPressable
      href={href}
      accessibilityLabel={label}
      onFocus={ring.onFocus}
      onBlur={ring.onBlur}
      testID={`fleet-section-${label.toLowerCase()}`}
      webAttributes={{ 'aria-current': active ? 'page' : undefined }}
      style={({ pressed }) => [styles.section, active && styles.sectionActive, pressed && !active && styles.sectionPressed, ring.focused && styles.focused]}
    >
      <Text variant="label" tone={active ? 'onPrimary' : 'primary'}>
        {label}
      </Text>
    </LinkPressable>
  );
}

const styles = StyleSheet.create({
  header: {
    gap: spacing.md,
  },
  titleRow: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    alignItems: 'flex-start',
    justifyContent: 'space-between',
    gap: spacing.md,
  },
  titleText: {
    flexShrink: 1,
    gap: spacing.xxs,
  },
  actions: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.sm,
  },
  sections: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.xs,
  },
  section: {
    minHeight: sizes.touch,
    paddingHorizontal: spacing.md,
    borderRadius: radii.pill,
    borderWidth: 1,
    borderColor: colors.borderStrong,
    backgroundColor: colors.surface,
    justifyContent: 'center',
  },
  sectionActive: {
    backgroundColor: colors.primary,
    borderColor: colors.primary,
  },
  sectionPressed: {
    backgroundColor: colors.surfaceMuted,
  },
  focused: {
    outlineColor: colors.focus,
    outlineStyle: 'solid',
    outlineWidth: sizes.focusRing,
    outlineOffset: 2,
  },
});
