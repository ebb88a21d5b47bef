import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { Button } from '@/components/ui/button';
import { EmptyState, ErrorState, LoadingState } from '@/components/ui/states';
import { Text } from '@/components/ui/text';
import { colors, spacing } from '@/components/theme/tokens';
import { errorMessage } from '@/hooks/api/api-client';
import { useAssetHistoryQuery } from '@/hooks/queries/assets';
import type { HistoryEntry } from '@/shared/schemas/assets';
import { formatDateTime } from './asset-words';
import { describeEntry } from './history-words';

const FIRST = 10;

/** The asset's append-only history, newest first: who, when, what, and each field's before -> after. */
export function AssetHistory({ assetId }: { assetId: string }) {
  const history = useAssetHistoryQuery(assetId);
  const [all, setAll] = useState(false);
  if (history.isPending) return <LoadingState label="Loading history…" />;
  if (history.isError) return <ErrorState message={errorMessage(history.error)} onRetry={() => void history.refetch()} />;
  const entries = history.data;
  if (entries.length === 0) return <EmptyState title="Nothing recorded yet." />;
  const shown = all ? entries : entries.slice(0, FIRST);
  return (
    <View style={styles.list} testID="asset-history">
      {shown.map((entry) => (
        <HistoryRow key={entry.id} entry={entry} />
      ))}
      {entries.length > FIRST ? (
        <Button
          label={all ? 'Show fewer' : `Show all ${entries.length}`}
          variant="ghost"
          compact
          onPress={() => setAll((value) => !value)}
          testID="asset-history-more"
        />
      ) : null}
    </View>
  );
}

function HistoryRow({ entry }: { entry: HistoryEntry }) {
  const line = describeEntry(entry);
  return (
    <View style={styles.row} testID={`history-${entry.id}`}>
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
