import { StyleSheet, View } from 'react-native';
import { Text } from '@/components/ui/text';
import { radii, spacing } from '@/components/theme/tokens';
import type { ReadinessResult } from '@/shared/schemas/readiness';
import { resultColors, resultLabel } from './readiness-words';

const MARKS: Record<ReadinessResult, string> = { go: '✓', conditional: '!', 'no-go': '✕' };

/** A gate result as a word with a mark, on its tint: never colour alone. */
export function ResultBadge({ result, testID }: { result: ReadinessResult; testID?: string }) {
  const { fg, bg } = resultColors(result);
  return (
    <View style={[styles.badge, { backgroundColor: bg, borderColor: fg }]} testID={testID} accessibilityLabel={`Result: ${resultLabel(result)}`}>
      <Text variant="label" weight="semibold" style={{ color: fg }} aria-hidden>
        {MARKS[result]}
      </Text>
      <Text variant="label" weight="semibold" style={{ color: fg }}>
        {resultLabel(result)}
      </Text>
    </View>
  );
}

/** The count of each result, each as text on its tint. */
export function ResultCountsRow({ counts, testID }: { counts: { go: number; conditional: number; noGo: number }; testID?: string }) {
  const rows: Array<[ReadinessResult, number]> = [
    ['go', counts.go],
    ['conditional', counts.conditional],
    ['no-go', counts.noGo],
  ];
  return (
    <View style={styles.counts} testID={testID}>
      {rows.map(([result, n]) => {
        const { fg, bg } = resultColors(result);
        return (
          <View key={result} style={[styles.count, { backgroundColor: bg, borderColor: fg }]}>
            <Text variant="label" weight="semibold" style={{ color: fg }}>
              {`${n} ${resultLabel(result).toLowerCase()}`}
            </Text>
          </View>
        );
      })}
    </View>
  );
}

const styles = StyleSheet.create({
  badge: {
    flexDirection: 'row',
    alignItems: 'center',
    alignSelf: 'flex-start',
    gap: spacing.xs,
    borderWidth: 1,
    borderRadius: radii.pill,
    paddingHorizontal: spacing.md,
    paddingVertical: spacing.xxs,
  },
  counts: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.sm,
  },
  count: {
    borderWidth: 1,
    borderRadius: radii.pill,
    paddingHorizontal: spacing.md,
    paddingVertical: spacing.xxs,
  },
});
