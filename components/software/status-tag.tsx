import { StyleSheet, View } from 'react-native';
import { Text } from '@/components/ui/text';
import { colors, radii, spacing } from '@/components/theme/tokens';
import type { ConformanceStatus } from '@/shared/schemas/software';
import { statusLabel, statusTone } from './software-words';

const TONES = StyleSheet.create({
  neutral: { backgroundColor: colors.surfaceMuted, borderColor: colors.borderStrong },
  primary: { backgroundColor: colors.primaryTint, borderColor: colors.primary },
  success: { backgroundColor: colors.successTint, borderColor: colors.success },
  warning: { backgroundColor: colors.warningTint, borderColor: colors.warning },
  danger: { backgroundColor: colors.dangerTint, borderColor: colors.danger },
});

const TEXT = StyleSheet.create({
  neutral: { color: colors.textMuted },
  primary: { color: colors.primary },
  success: { color: colors.success },
  warning: { color: colors.warning },
  danger: { color: colors.danger },
});

/** A status in words on its colour; a broken rule or a missing ECU also gets a heavier edge. */
export function StatusTag({ status, testID }: { status: ConformanceStatus | null; testID?: string }) {
  const tone = statusTone(status);
  const strong = status === 'rule-broken' || status === 'missing';
  return (
    <View style={[styles.tag, TONES[tone], strong && styles.strong]} testID={testID}>
      <Text variant="caption" weight="medium" style={TEXT[tone]} numberOfLines={1}>
        {statusLabel(status)}
      </Text>
    </View>
  );
}

/** The cell of a table: the version above its status tag, tinted as the tag. */
export function VersionCell({
  installed,
  status,
  accessibilityLabel,
  testID,
}: {
  installed: string | null;
  status: ConformanceStatus | null;
  accessibilityLabel: string;
  testID?: string;
}) {
  const tone = statusTone(status);
  return (
    <View style={[styles.cell, TONES[tone]]} accessible accessibilityLabel={accessibilityLabel} testID={testID}>
      <Text variant="label" numberOfLines={1} selectable>
        {installed ?? '—'}
      </Text>
      <Text variant="caption" weight="medium" style={TEXT[tone]} numberOfLines={1}>
        {statusLabel(status)}
      </Text>
    </View>
  );
}

const styles = StyleSheet.create({
  tag: {
    alignSelf: 'flex-start',
    borderRadius: radii.pill,
    borderWidth: 1,
    paddingHorizontal: spacing.sm,
    paddingVertical: spacing.xxs,
  },
  strong: {
    borderWidth: 2,
  },
  cell: {
    flex: 1,
    borderRadius: radii.sm,
    borderWidth: 1,
    paddingHorizontal: spacing.sm,
    paddingVertical: spacing.xs,
    justifyContent: 'center',
  },
});
