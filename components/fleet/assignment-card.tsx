import { StyleSheet, View } from 'react-native';
import { Badge } from '@/components/ui/chip';
import { Icon } from '@/components/ui/icon';
import { LinkPressable } from '@/components/ui/link-pressable';
import { Text } from '@/components/ui/text';
import { useFocusRing } from '@/components/ui/use-focus-ring';
import { colors, radii, shadows, sizes, spacing } from '@/components/theme/tokens';
import { ASSIGNMENT_STATUS_LABELS, type Assignment } from '@/shared/schemas/fleet';
import { formatWindow } from './fleet-time';
import { ASSIGNMENT_STATUS_TONES, assignmentFlags, purposeLabel } from './fleet-words';

const NO_CONFLICTS: ReadonlySet<string> = new Set();

/** One assignment as a card that opens its page: vehicle, driver, purpose, window, status and flags in words. */
export function AssignmentCard({
  assignment: a,
  conflicts = NO_CONFLICTS,
  showDriver = true,
}: {
  assignment: Assignment;
  conflicts?: ReadonlySet<string>;
  showDriver?: boolean;
}) {
  const ring = useFocusRing();
  const flags = assignmentFlags(a, conflicts);
  const status = ASSIGNMENT_STATUS_LABELS[a.status];
  const when = formatWindow(a.startsAt, a.endsAt);
  const alarming = flags.some((f) => f.tone === 'danger');
  return (
    <LinkPressable
      href={`/fleet/assignments/${a.id}`}
      onFocus={ring.onFocus}
      onBlur={ring.onBlur}
      testID={`assignment-${a.id}`}
      style={({ pressed }) => [styles.card, alarming && styles.alarming, pressed && styles.pressed, ring.focused && styles.focused]}
    >
      <View style={styles.top}>
        <Text variant="bodyStrong" style={styles.tag}>
          {a.assetTag}
        </Text>
        <Badge label={status} tone={ASSIGNMENT_STATUS_TONES[a.status]} />
        <Icon name="chevron-right" size={sizes.iconSm} color={colors.textMuted} />
      </View>
      <Text>{showDriver ? `${a.driver.name} · ${purposeLabel(a)}` : purposeLabel(a)}</Text>
      <Text variant="caption" tone="muted">
        {when} · {a.vehicle.stage}
      </Text>
      {flags.length ? (
        <View style={styles.flags}>
          {flags.map((flag) => (
            <Badge key={flag.label} label={flag.label} tone={flag.tone} />
          ))}
        </View>
      ) : null}
    </LinkPressable>
  );
}

const styles = StyleSheet.create({
  card: {
    backgroundColor: colors.surface,
    borderRadius: radii.lg,
    borderWidth: 1,
    borderColor: colors.border,
    padding: spacing.md,
    gap: spacing.xs,
    minHeight: sizes.touch,
    ...shadows.card,
  },
  alarming: {
    borderColor: colors.danger,
    borderLeftWidth: spacing.xs,
  },
  pressed: {
    backgroundColor: colors.surfaceMuted,
  },
  top: {
    flexDirection: 'row',
    alignItems: 'center',
    gap: spacing.sm,
  },
  tag: {
    flex: 1,
  },
  flags: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.xs,
  },
  focused: {
    outlineColor: colors.focus,
    outlineStyle: 'solid',
    outlineWidth: sizes.focusRing,
    outlineOffset: 2,
  },
});
