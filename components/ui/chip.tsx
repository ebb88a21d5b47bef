import { Pressable, StyleSheet, View } from 'react-native';
import { colors, radii, sizes, spacing } from '@/components/theme/tokens';
import { Icon } from './icon';
import { Text } from './text';
import { useFocusRing } from './use-focus-ring';

export type ChipProps = {
  label: string;
  selected?: boolean;
  onPress?: () => void;
  disabled?: boolean;
  /** `radio` inside a single choice, `checkbox` inside a multiple choice. */
  kind?: 'radio' | 'checkbox' | 'button';
  accessibilityLabel?: string;
  testID?: string;
};

/** A pressable pill with a 44 px touch target; shows a check when selected. */
export function Chip({ label, selected = false, onPress, disabled = false, kind = 'button', accessibilityLabel, testID }: ChipProps) {
  const { focused, onFocus, onBlur } = useFocusRing();
  return (
    <Pressable
      accessibilityRole={kind}
      accessibilityLabel={accessibilityLabel ?? label}
      aria-checked={kind === 'button' ? undefined : selected}
      // A toggle button says "pressed"; aria-selected belongs to options, tabs and rows, not buttons.
      aria-pressed={kind === 'button' ? selected : undefined}
      aria-disabled={disabled}
      disabled={disabled}
      onPress={onPress}
      onFocus={onFocus}
      onBlur={onBlur}
      testID={testID}
      style={({ pressed }) => [
        styles.chip,
        selected ? styles.selected : styles.unselected,
        pressed && !selected && styles.pressed,
        disabled && styles.disabled,
        focused && styles.focused,
      ]}
    >
      {selected ? <Icon name="check" size={sizes.iconSm} color={colors.onPrimary} /> : null}
      <Text variant="label" tone={selected ? 'onPrimary' : 'default'} numberOfLines={1}>
        {label}
      </Text>
    </Pressable>
  );
}

export type BadgeTone = 'neutral' | 'primary' | 'success' | 'warning' | 'danger';

/** A small read-only status label ("Active", "Invitation pending"). */
export function Badge({ label, tone = 'neutral', testID }: { label: string; tone?: BadgeTone; testID?: string }) {
  return (
    <View style={[styles.badge, badgeTones[tone].box]} testID={testID}>
      <Text variant="caption" weight="medium" style={badgeTones[tone].text}>
        {label}
      </Text>
    </View>
  );
}

const styles = StyleSheet.create({
  chip: {
    minHeight: sizes.touch,
    paddingHorizontal: spacing.lg,
    borderRadius: radii.pill,
    borderWidth: 1,
    flexDirection: 'row',
    alignItems: 'center',
    gap: spacing.xs,
  },
  unselected: {
    backgroundColor: colors.surface,
    borderColor: colors.borderStrong,
  },
  selected: {
    backgroundColor: colors.primary,
    borderColor: colors.primary,
  },
  pressed: {
    backgroundColor: colors.surfaceMuted,
  },
  disabled: {
    opacity: 0.55,
  },
  focused: {
    outlineColor: colors.focus,
    outlineStyle: 'solid',
    outlineWidth: sizes.focusRing,
    outlineOffset: 2,
  },
  badge: {
    borderRadius: radii.pill,
    paddingHorizontal: spacing.sm,
    paddingVertical: spacing.xxs,
  },
});

const badgeTones = {
  neutral: StyleSheet.create({ box: { backgroundColor: colors.surfaceMuted }, text: { color: colors.textMuted } }),
  primary: StyleSheet.create({ box: { backgroundColor: colors.primaryTint }, text: { color: colors.primary } }),
  success: StyleSheet.create({ box: { backgroundColor: colors.successTint }, text: { color: colors.success } }),
  warning: StyleSheet.create({ box: { backgroundColor: colors.warningTint }, text: { color: colors.warning } }),
  danger: StyleSheet.create({ box: { backgroundColor: colors.dangerTint }, text: { color: colors.danger } }),
} satisfies Record<BadgeTone, unknown>;
