import { useRouter } from 'expo-router';
import { useState } from 'react';
import { StyleSheet, View, type LayoutChangeEvent } from 'react-native';
import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { PageTitle } from '@/components/ui/page-title';
import { Screen } from '@/components/ui/screen';
import { ErrorState, LoadingState, Notice } from '@/components/ui/states';
import { Heading, Text } from '@/components/ui/text';
import { TextField } from '@/components/ui/text-field';
import { TextLink } from '@/components/ui/text-link';
import { spacing } from '@/components/theme/tokens';
import { errorMessage } from '@/hooks/api/api-client';
import { useSetTargetDateMutation, useStageTrendQuery } from '@/hooks/queries/readiness';
import { useSession } from '@/hooks/use-session';
import type { StageTrend } from '@/shared/schemas/readiness';
import { forecastSentence, formatScore, isLead, targetSentence } from './readiness-words';
import { TrendChart, TrendTable } from './trend-chart';

/** One stage over the last 30 days: score and load, the fitted line, the forecast and the target date. */
export function StageTrendScreen({ stageId }: { stageId: string }) {
  const router = useRouter();
  const { user } = useSession();
  const trend = useStageTrendQuery(stageId);
  const [width, setWidth] = useState(320);
  const lead = isLead(user?.role);
  const onLayout = (event: LayoutChangeEvent) => setWidth(Math.floor(event.nativeEvent.layout.width));

  return (
    <Screen testID="stage-trend">
      <PageTitle title={trend.data ? `${trend.data.name} trend` : 'Stage trend'} />
      <TextLink href="/readiness" label="Back to readiness" testID="stage-trend-back" />
      {trend.isPending ? (
        <LoadingState label="Loading the trend…" />
      ) : trend.isError ? (
        <ErrorState message={errorMessage(trend.error)} onRetry={() => void trend.refetch()} retrying={trend.isFetching} />
      ) : (
        <>
          <View style={styles.header}>
            <Heading level={1} variant="title">
              {`${trend.data.name}: trend and forecast`}
            </Heading>
            <Text testID="stage-trend-forecast" variant="bodyStrong">
              {forecastSentence(trend.data.forecast)}
            </Text>
            {trend.data.fit ? (
              <Text tone="muted">{`Fitted over ${trend.data.fit.fromDate} to ${trend.data.fit.toDate}: the load changes by ${formatScore(trend.data.fit.slopePerDay)} points a day.`}</Text>
            ) : null}
          </View>
          {lead ? (
            <Button label="Open a gate review" icon="plus" onPress={() => router.push(`/gates/new?stageId=${stageId}`)} testID="stage-trend-open-review" />
          ) : null}
          <Card style={styles.card}>
            <View onLayout={onLayout}>
              <TrendChart trend={trend.data} width={width} />
            </View>
          </Card>
          <TargetDateCard trend={trend.data} editable={lead} />
          <Card style={styles.card}>
            <Heading level={2} variant="heading">
              Daily figures
            </Heading>
            <TrendTable trend={trend.data} />
          </Card>
        </>
      )}
    </Screen>
  );
}

function TargetDateCard({ trend, editable }: { trend: StageTrend; editable: boolean }) {
  const save = useSetTargetDateMutation(trend.stageId);
  const [value, setValue] = useState(trend.targetDate ?? '');
  const [error, setError] = useState<string | null>(null);
  const [done, setDone] = useState<string | null>(null);

  const submit = async (date: string | null) => {
    setDone(null);
    if (date !== null && !/^\d{4}-\d{2}-\d{2}$/.test(date)) {
      setError('Use a date like 2026-12-31.');
      return;
    }
    setError(null);
    try {
      const result = await save.mutateAsync(date);
      setValue(result.targetDate ?? '');
      setDone(targetSentence(result.targetDate, result.meetsTarget));
    } catch (cause) {
      setError(errorMessage(cause));
    }
  };

  return (
    <Card style={styles.card} testID="stage-target">
      <Heading level={2} variant="heading">
        Gate target date
      </Heading>
      <Text testID="stage-target-sentence">{targetSentence(trend.targetDate, trend.meetsTarget)}</Text>
      {editable ? (
        <>
          <TextField
            label="Target date"
            value={value}
            onChangeText={(text) => setValue(text.trim())}
            placeholder="2026-12-31"
            hint="Year-month-day. Leave empty and save to clear it."
            error={error ?? undefined}
            autoCorrect={false}
            testID="stage-target-input"
          />
          <View style={styles.row}>
            <Button label="Save target date" compact loading={save.isPending} onPress={() => void submit(value === '' ? null : value)} testID="stage-target-save" />
            {trend.targetDate ? (
              <Button label="Clear" variant="secondary" compact onPress={() => void submit(null)} testID="stage-target-clear" />
            ) : null}
          </View>
          {done ? <Notice tone="success" message={`Saved. ${done}`} /> : null}
        </>
      ) : null}
    </Card>
  );
}

const styles = StyleSheet.create({
  header: { gap: spacing.xs },
  card: { gap: spacing.md },
  row: { flexDirection: 'row', gap: spacing.md, flexWrap: 'wrap' },
});
