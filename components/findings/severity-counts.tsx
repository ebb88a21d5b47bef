import { Pressable, StyleSheet, View } from 'react-native';
import type { BadgeTone } from '@/components/ui/chip';
import { Icon } from '@/components/ui/icon';
import { Text } from '@/components/ui/text';
import { useFocusRing } from '@/components/ui/use-focus-ring';
import { colors, radii, sizes, spacing } from '@/components/theme/tokens';
import { FINDING_SEVERITIES, FINDING_SEVERITY_LABELS, type FindingCounts, type FindingSeverity } from '@/shared/schemas/findings';
import { SEVERITY_TONES, plural } from './finding-words';

/**
 * Open findings per severity as chips: the word, the number and the colour together (never the
 * colour alone). Pressing one filters the list to that severity; pressing it again clears it.
 */
export function SeverityCounts({
  counts,
  selected,
  onSelect,
}: {
  counts: FindingCounts;
  selected?: FindingSeverity;
  onSelect?: (severity: FindingSeverity | undefined) => void;
}) {
  return (
    <View style={styles.row} role="group" aria-label="Open findings by severity" testID="severity-counts">
      {FINDING_SEVERITIES.map((severity) => (
        <CountChip
          key={severity}
          severity={severity}
          count={counts[severity]}
          selected={selected === severity}
          onPress={onSelect ? () => onSelect(selected === severity ? undefined : severity) : undefined}
        />
      ))}
    </View>
  );
}

function CountChip({ severity, count, selected, onPress }: { severity: FindingSeverity; count: number; selected: boolean; onPress?: () => void }) {
  const ring = useFocusRing();
  const palette = tones[SEVERITY_TONES[severity]];
  const label = FINDING_SEVERITY_LABELS[severity];
  return (
    <Pressable
      accessibilityRole="button"
      accessibilityLabel={`${label}, ${plural(count, 'open finding')}${onPress ? (selected ? '. Showing only these; press to show all' : `. Show only ${label.toLowerCase()}`) : ''}`}
      aria-pressed={onPress ? selected : undefined}
      disabled={!onPress}
      onPress={onPress}
      onFocus={ring.onFocus}
      onBlur={ring.onBlur}
      testID={`severity-count-${severity}`}
      style={({ pressed }) => [
        styles.chip,
        { backgroundColor: palette.bg, borderColor: selected ? colors.primary : palette.border },
        selected && styles.selected,
        pressed && styles.pressed,
        ring.focused && styles.focused,
      ]}
    >
      {severity === 'safety' ? <Icon name="warning" size={sizes.iconXs} color={palette.fg} /> : null}
      {selected ? <Icon name="check" size={sizes.iconXs} color={colors.primary} /> : null}
      <Text variant="label" style={{ color: palette.fg }}>
        {label}
      </Text>
      <Text variant="bodyStrong" weight="semibold" style={{ color: palette.fg }} testID={`severity-count-${severity}-value`}>
        {count}
      </Text>
    </Pressable>
  );
}

const tones: Record<BadgeTone, { bg: string; fg: string; border: string }> = {
  danger: { bg: colors.dangerTint, fg: colors.danger, border: colors.danger },
  warning: { bg: colors.warningTint, fg: colors.warning, border: colors.warning },
  primary: { bg: colors.primaryTint, fg: colors.primary, border: colors.primary },
  success: { bg: colors.successTint, fg: colors.success, border: colors.success },
  neutral: { bg: colors.surfaceMuted, fg: colors.textMuted, border: colors.borderStrong },
};

const styles = StyleSheet.create({
  row: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.sm,
  },
  chip: {
    minHeight: sizes.touch,
    flexDirection: 'row',
    alignItems: 'center',
    gap: spacing.xs,
    paddingHorizontal: spacing.md,
    borderRadius: radii.pill,
    borderWidth: 1,
  },
  selected: {
    borderWidth: 2,
  },
  pressed: {
    opacity: 0.85,
  },
  focused: {
    outlineColor: colors.focus,
    outlineStyle: 'solid',
    outlineWidth: sizes.focusRing,
    outlineOffset: 2,
  },
});
