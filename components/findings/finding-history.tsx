import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { Button } from '@/components/ui/button';
import { EmptyState, ErrorState, LoadingState } from '@/components/ui/states';
import { Text } from '@/components/ui/text';
import { formatDateTime } from '@/components/assets/asset-words';
import { colors, spacing } from '@/components/theme/tokens';
import { errorMessage } from '@/hooks/api/api-client';
import { useFindingHistoryQuery } from '@/hooks/queries/findings';
import type { HistoryEntry } from '@/shared/schemas/assets';
import { describeFindingEntry } from './finding-history-words';

const FIRST = 10;

/** The finding's append-only history, newest first: who, when, what, and each field's before -> after. */
export function FindingHistory({ findingId }: { findingId: string }) {
  const history = useFindingHistoryQuery(findingId);
  const [all, setAll] = useState(false);
  if (history.isPending) return history.isPaused ? <Text tone="muted">The history shows when the connection is back.</Text> : <LoadingState label="Loading history…" />;
  if (history.isError) return <ErrorState message={errorMessage(history.error)} onRetry={() => void history.refetch()} />;
  const entries = history.data;
  if (entries.length === 0) return <EmptyState title="Nothing recorded yet." />;
  const shown = all ? entries : entries.slice(0, FIRST);
  return (
    <View style={styles.list} testID="finding-history">
      {shown.map((entry) => (
        <HistoryRow key={entry.id} entry={entry} />
      ))}
      {entries.length > FIRST ? (
        <Button
          label={all ? 'Show fewer' : `Show all ${entries.length}`}
          variant="ghost"
          compact
          onPress={() => setAll((value) => !value)}
          testID="finding-history-more"
        />
      ) : null}
    </View>
  );
}

function HistoryRow({ entry }: { entry: HistoryEntry }) {
  const line = describeFindingEntry(entry);
  return (
    <View style={styles.row} testID={`finding-history-${entry.id}`}>
      <View style={styles.dot} />
      <View style={styles.body}>
        <Text variant="caption" tone="muted">
          {entry.actor?.name ?? 'Proofyard'} · {formatDateTime(entry.at)}
        </Text>
        <Text>{line.sentence}</Text>
        {line.changes.map((change) => (
          <Text key={change.key} variant="caption">
            <Text variant="caption" weight="semibold">
              {change.label}:
            </Text>{' '}
            {change.before} → {change.after}
          </Text>
        ))}
        {line.note ? (
          <Text variant="caption" tone="muted">
            {line.note}
          </Text>
        ) : null}
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  list: {
    gap: spacing.md,
  },
  row: {
    flexDirection: 'row',
    gap: spacing.md,
  },
  dot: {
    width: spacing.sm,
    height: spacing.sm,
    borderRadius: spacing.xs,
    marginTop: spacing.sm,
    backgroundColor: colors.accent,
  },
  body: {
    flex: 1,
    minWidth: 0,
    gap: spacing.xxs,
  },
});
