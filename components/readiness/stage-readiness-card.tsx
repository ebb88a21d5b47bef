import { useRouter } from 'expo-router';
import { StyleSheet, View } from 'react-native';
import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { Heading, Text } from '@/components/ui/text';
import { TextLink } from '@/components/ui/text-link';
import { spacing } from '@/components/theme/tokens';
import type { StageRollup } from '@/shared/schemas/readiness';
import { BlockerList } from './blocker-list';
import { forecastSentence, formatScore, targetSentence } from './readiness-words';
import { ResultCountsRow } from './result-badge';

export type StageReadinessCardProps = {
  stage: StageRollup;
  /** Links to the stage's trend and, for a lead, the button to open a gate review. */
  showLinks?: boolean;
  canOpenReview?: boolean;
  testID?: string;
  blockersTestID?: string;
};

/** One stage's roll-up: mean, counts per result, lowest asset, what stops the gate, target and forecast. */
export function StageReadinessCard({ stage, showLinks = true, canOpenReview = false, testID, blockersTestID }: StageReadinessCardProps) {
  const router = useRouter();
  return (
    <Card testID={testID ?? `stage-readiness-${stage.stageId}`} style={styles.card}>
      <View style={styles.head}>
        <Heading level={2} variant="heading">
          {stage.name}
        </Heading>
        <Text tone="muted" variant="caption">
          {`${stage.assetCount} ${stage.assetCount === 1 ? 'asset' : 'assets'} · go from ${stage.gate.goThreshold}, conditional from ${stage.gate.conditionalThreshold}`}
        </Text>
      </View>
      <Text variant="title" testID={`stage-mean-${stage.stageId}`}>
        {stage.meanScore === null ? 'No assets' : `Mean score ${formatScore(stage.meanScore)}`}
      </Text>
      <ResultCountsRow counts={stage.counts} testID={`stage-counts-${stage.stageId}`} />
      {stage.notCleared > 0 ? (
        <Text tone="danger" weight="semibold">{`${stage.notCleared} not cleared (open safety finding)`}</Text>
      ) : null}
      {stage.lowest ? (
        <View style={styles.row}>
          <Text tone="muted">Lowest:</Text>
          <TextLink href={`/assets/${stage.lowest.id}`} label={`${stage.lowest.tag} (${formatScore(stage.lowest.score)})`} testID={`stage-lowest-${stage.stageId}`} />
        </View>
      ) : null}
      <View style={styles.section}>
        <Heading level={3} variant="bodyStrong">
          What stops the gate
        </Heading>
        <BlockerList blockers={stage.blockers} testID={blockersTestID ?? `stage-blockers-${stage.stageId}`} />
      </View>
      <View style={styles.section}>
        <Text>{targetSentence(stage.targetDate, stage.meetsTarget)}</Text>
        <Text testID={`stage-forecast-${stage.stageId}`}>{forecastSentence(stage.forecast)}</Text>
      </View>
      {showLinks ? (
        <View style={styles.actions}>
          <TextLink href={`/readiness/${stage.stageId}`} label="Trend and forecast" testID={`stage-trend-link-${stage.stageId}`} />
          {canOpenReview ? (
            <Button
              label="Open a gate review"
              compact
              variant="secondary"
              onPress={() => router.push(`/gates/new?stageId=${stage.stageId}`)}
              testID={`stage-open-review-${stage.stageId}`}
            />
          ) : null}
        </View>
      ) : null}
    </Card>
  );
}

const styles = StyleSheet.create({
  card: { gap: spacing.md },
  head: { gap: spacing.xxs },
  row: { flexDirection: 'row', alignItems: 'center', gap: spacing.sm, flexWrap: 'wrap' },
  section: { gap: spacing.xs },
  actions: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', gap: spacing.lg },
});
