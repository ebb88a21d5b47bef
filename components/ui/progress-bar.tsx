import { StyleSheet, View } from 'react-native';
import { colors, radii, spacing } from '@/components/theme/tokens';
import { Text } from './text';

export type ProgressBarProps = {
  /** 0 to 1. */
  value: number;
  /** What the bar measures, read by screen readers ("Checklist progress"). */
  label: string;
  /** Shown beside the bar ("12 of 30 done"); the bar is never the only signal. */
  caption?: string;
  tone?: 'primary' | 'success' | 'warning';
  size?: 'sm' | 'md';
  testID?: string;
};

export function ProgressBar({ value, label, caption, tone = 'primary', size = 'md', testID }: ProgressBarProps) {
  const clamped = Number.isFinite(value) ? Math.min(1, Math.max(0, value)) : 0;
  const percent = Math.round(clamped * 100);
  return (
    <View style={styles.wrap} testID={testID}>
      <View
        accessibilityRole="progressbar"
        accessibilityLabel={label}
        accessibilityValue={{ min: 0, max: 100, now: percent, text: caption ?? `${percent}%` }}
        aria-valuemin={0}
        aria-valuemax={100}
        aria-valuenow={percent}
        aria-valuetext={caption ?? `${percent}%`}
        style={[styles.track, size === 'sm' ? styles.small : styles.medium]}
      >
        <View style={[styles.fill, fills[tone], { width: `${percent}%` }]} />
      </View>
      {caption ? (
        <Text variant="caption" tone="muted">
          {caption}
        </Text>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: {
    gap: spacing.xxs,
    alignSelf: 'stretch',
  },
  track: {
    backgroundColor: colors.surfaceMuted,
    borderRadius: radii.pill,
    borderWidth: 1,
    borderColor: colors.border,
    overflow: 'hidden',
  },
  small: {
    height: spacing.sm,
  },
  medium: {
    height: spacing.md,
  },
  fill: {
    height: '100%',
    borderRadius: radii.pill,
  },
});

const fills = StyleSheet.create({
  primary: { backgroundColor: colors.primary },
  success: { backgroundColor: colors.success },
  warning: { backgroundColor: colors.warning },
});
