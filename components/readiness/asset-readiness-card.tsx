import { StyleSheet, View } from 'react-native';
import { Card } from '@/components/ui/card';
import { ProgressBar } from '@/components/ui/progress-bar';
import { ErrorState, LoadingState } from '@/components/ui/states';
import { Heading, Text } from '@/components/ui/text';
import { TextLink } from '@/components/ui/text-link';
import { spacing } from '@/components/theme/tokens';
import { errorMessage, isApiError } from '@/hooks/api/api-client';
import { useAssetReadinessQuery } from '@/hooks/queries/readiness';
import { READINESS_PARTS, type AssetReadiness, type BreakdownItem } from '@/shared/schemas/readiness';
import { PART_LABELS, formatPercent, formatScore, itemHref } from './readiness-words';
import { ResultBadge } from './result-badge';

/** On the asset page: the asset's readiness for the gate at the end of its stage, and why. */
export function AssetReadinessCard({ assetId }: { assetId: string }) {
  const query = useAssetReadinessQuery(assetId);
  return (
    <Card testID="asset-readiness" style={styles.card}>
      <Heading level={2} variant="heading">
        Readiness
      </Heading>
      {query.isPending ? (
        <LoadingState label="Loading readiness…" />
      ) : query.isError ? (
        isApiError(query.error) && query.error.status === 404 ? (
          <Text tone="muted">No readiness for this asset yet.</Text>
        ) : (
          <ErrorState message={errorMessage(query.error)} onRetry={() => void query.refetch()} />
        )
      ) : (
        <AssetReadinessBody readiness={query.data} />
      )}
    </Card>
  );
}

export function AssetReadinessBody({ readiness }: { readiness: AssetReadiness }) {
  const { assetId } = readiness;
  return (
    <View style={styles.body}>
      <Text tone="muted" variant="caption">{`For the gate at the end of ${readiness.stage}`}</Text>
      <View style={styles.scoreRow}>
        <Text variant="display" testID="asset-readiness-score" accessibilityLabel={`Score ${formatScore(readiness.score)} of 100`}>
          {formatScore(readiness.score)}
        </Text>
        <ResultBadge result={readiness.result} testID="asset-readiness-result" />
      </View>
      {readiness.cleared ? null : (
        <View style={styles.notCleared} testID="asset-readiness-not-cleared">
          <Text tone="danger" weight="semibold">
            Not cleared: an open safety finding makes the result no-go whatever the score.
          </Text>
          {readiness.notClearedBy.map((f) => (
            <TextLink key={f.id} href={`/findings/${f.id}`} label={f.title} />
          ))}
        </View>
      )}
      <View style={styles.parts}>
        {READINESS_PARTS.map((part) => (
          <ProgressBar
            key={part}
            value={readiness.parts[part]}
            label={`${PART_LABELS[part]}, weight ${formatPercent(readiness.weights[part])}`}
            caption={`${PART_LABELS[part]}: ${formatPercent(readiness.parts[part])} (weight ${formatPercent(readiness.weights[part])})`}
            size="sm"
            tone={readiness.parts[part] >= 0.9 ? 'success' : readiness.parts[part] >= 0.75 ? 'primary' : 'warning'}
            testID={`asset-readiness-part-${part}`}
          />
        ))}
      </View>
      <View style={styles.breakdown} testID="asset-readiness-breakdown">
        <Heading level={3} variant="bodyStrong">
          What took points
        </Heading>
        {readiness.breakdown.length === 0 ? <Text tone="muted">Nothing: every part is complete.</Text> : null}
        {readiness.breakdown.map((entry) => (
          <View key={entry.part} style={styles.entry} testID={`asset-readiness-breakdown-${entry.part}`}>
            <Text>{entry.text}</Text>
            {entry.items.map((item) => (
              <View key={`${item.kind}-${item.id}`} style={styles.item}>
                <TextLink href={itemHref(item, assetId)} label={itemLabel(item)} />
              </View>
            ))}
          </View>
        ))}
      </View>
    </View>
  );
}

function itemLabel(item: BreakdownItem): string {
  return item.points === undefined ? item.label : `${item.label} (${formatScore(item.points)})`;
}

const styles = StyleSheet.create({
  card: { gap: spacing.md },
  body: { gap: spacing.md },
  scoreRow: { flexDirection: 'row', alignItems: 'center', gap: spacing.md, flexWrap: 'wrap' },
  notCleared: { gap: spacing.xxs },
  parts: { gap: spacing.sm },
  breakdown: { gap: spacing.sm },
  entry: { gap: 0 },
  item: { paddingLeft: spacing.md },
});
