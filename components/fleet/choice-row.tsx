import { Pressable, StyleSheet, View } from 'react-native';
import { Badge, type BadgeTone } from '@/components/ui/chip';
import { Icon } from '@/components/ui/icon';
import { Text } from '@/components/ui/text';
import { useFocusRing } from '@/components/ui/use-focus-ring';
import { colors, radii, sizes, spacing } from '@/components/theme/tokens';

export type ChoiceBadge = { label: string; tone: BadgeTone };

/** One row of a single choice (a vehicle, a driver): a title, a line of facts and flags in words. */
export function ChoiceRow({
  title,
  subtitle,
  badges = [],
  selected,
  onPress,
  testID,
}: {
  title: string;
  subtitle?: string;
  badges?: readonly ChoiceBadge[];
  selected: boolean;
  onPress: () => void;
  testID?: string;
}) {
  const ring = useFocusRing();
  const spoken = [title, subtitle, ...badges.map((b) => b.label)].filter(Boolean).join(', ');
  return (
    <Pressable
      accessibilityRole="radio"
      accessibilityLabel={spoken}
      aria-checked={selected}
      onPress={onPress}
      onFocus={ring.onFocus}
      onBlur={ring.onBlur}
      testID={testID}
      style={({ pressed }) => [styles.row, selected && styles.rowSelected, pressed && !selected && styles.rowPressed, ring.focused && styles.focused]}
    >
      <View style={[styles.radio, selected && styles.radioOn]}>{selected ? <Icon name="check" size={sizes.iconXs} color={colors.onPrimary} /> : null}</View>
      <View style={styles.text}>
        <Text variant="bodyStrong">{title}</Text>
        {subtitle ? (
          <Text variant="caption" tone="muted">
            {subtitle}
          </Text>
        ) : null}
        {badges.length ? (
          <View style={styles.badges}>
            {badges.map((badge) => (
              <Badge key={badge.label} label={badge.label} tone={badge.tone} />
            ))}
          </View>
        ) : null}
      </View>
    </Pressable>
  );
}

const styles = StyleSheet.create({
  row: {
    minHeight: sizes.control,
    flexDirection: 'row',
    alignItems: 'center',
    gap: spacing.md,
    paddingHorizontal: spacing.md,
    paddingVertical: spacing.sm,
    borderRadius: radii.md,
    borderWidth: 1,
    borderColor: colors.border,
    backgroundColor: colors.surface,
  },
  rowSelected: {
    backgroundColor: colors.primaryTint,
    borderColor: colors.primary,
  },
  rowPressed: {
    backgroundColor: colors.surfaceMuted,
  },
  radio: {
    width: sizes.indicator,
    height: sizes.indicator,
    borderRadius: radii.pill,
    borderWidth: 2,
    borderColor: colors.borderStrong,
    alignItems: 'center',
    justifyContent: 'center',
    backgroundColor: colors.surface,
  },
  radioOn: {
    backgroundColor: colors.primary,
    borderColor: colors.primary,
  },
  text: {
    flex: 1,
    minWidth: 0,
    gap: spacing.xxs,
  },
  badges: {
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
