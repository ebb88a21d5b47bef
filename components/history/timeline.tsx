import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import type { UseQueryResult } from '@tanstack/react-query';
import { Button } from '@/components/ui/button';
import { EmptyState, ErrorState, LoadingState } from '@/components/ui/states';
import { Text } from '@/components/ui/text';
import { formatDateTime } from '@/components/assets/asset-words';
import { colors, spacing } from '@/components/theme/tokens';
import { errorMessage } from '@/hooks/api/api-client';
import type { HistoryEntry } from '@/shared/schemas/assets';

const FIRST = 10;

/** One entry in plain words: a sentence, each field's before -> after, and an optional note. */
export type TimelineLine = {
  sentence: string;
  changes: Array<{ key: string; label: string; before: string; after: string }>;
  note: string | null;
};

type TimelineProps = {
  /** The history query (entries newest first). */
  history: UseQueryResult<HistoryEntry[]>;
  /** Turns an entry into words; each entity has its own field labels and actions. */
  describe: (entry: HistoryEntry) => TimelineLine;
  /** The list's test id; the "Show all" button gets `${testID}-more`. */
  testID: string;
  /** Test id of one row, e.g. `history-${entry.id}`. */
  rowTestID: (entry: HistoryEntry) => string;
  /** Shown instead of the spinner while the query waits for the connection; without it the spinner stays. */
  pausedMessage?: string;
};

/** An append-only history, newest first: who, when, what, and each field's before -> after. Shows the first ten, then a toggle. */
export function Timeline({ history, describe, testID, rowTestID, pausedMessage }: TimelineProps) {
  const [all, setAll] = useState(false);
  if (history.isPending) return pausedMessage && history.isPaused ? <Text tone="muted">{pausedMessage}</Text> : <LoadingState label="Loading history…" />;
  if (history.isError) return <ErrorState message={errorMessage(history.error)} onRetry={() => void history.refetch()} />;
  const entries = history.data;
  if (entries.length === 0) return <EmptyState title="Nothing recorded yet." />;
  const shown = all ? entries : entries.slice(0, FIRST);
  return (
    <View style={styles.list} testID={testID}>
      {shown.map((entry) => (
        <TimelineRow key={entry.id} line={describe(entry)} entry={entry} testID={rowTestID(entry)} />
      ))}
      {entries.length > FIRST ? (
        <Button
          label={all ? 'Show fewer' : `Show all ${entries.length}`}
          variant="ghost"
          compact
          onPress={() => setAll((value) => !value)}
          testID={`${testID}-more`}
        />
      ) : null}
    </View>
  );
}

function TimelineRow({ entry, line, testID }: { entry: HistoryEntry; line: TimelineLine; testID: string }) {
  return (
    <View style={styles.row} testID={testID}>
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
