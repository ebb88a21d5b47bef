import { useState } from 'react';
import { FlatList, StyleSheet, View } from 'react-native';
import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { LinkPressable } from '@/components/ui/link-pressable';
import { Screen } from '@/components/ui/screen';
import { Select } from '@/components/ui/select';
import { EmptyState, ErrorState, LoadingState, Notice } from '@/components/ui/states';
import { Text } from '@/components/ui/text';
import { sizes, spacing } from '@/components/theme/tokens';
import { errorMessage } from '@/hooks/api/api-client';
import { downloadWithToken } from '@/hooks/api/download';
import { reflashCsvPath, useReflashDoneMutation, useReflashQuery, type ReflashFilters } from '@/hooks/queries/software';
import { useStagesQuery } from '@/hooks/queries/stages';
import { useBreakpoints } from '@/hooks/use-breakpoints';
import { useSession } from '@/hooks/use-session';
import type { ReflashEntry } from '@/shared/schemas/software';
import { SoftwareHeader } from './software-header';
import { softwareCan } from './software-words';
import { StatusTag } from './status-tag';

const ALL = 'all';

/** Which ECUs must be flashed, with what; marking one done records the flash. */
export function SoftwareReflashScreen() {
  const { user, currentProgramId, currentProgram } = useSession();
  const { isWide } = useBreakpoints();
  const [stageId, setStageId] = useState<string>(ALL);
  const [exporting, setExporting] = useState(false);
  const [notice, setNotice] = useState<{ tone: 'success' | 'danger'; message: string } | null>(null);
  const stages = useStagesQuery(currentProgramId);
  const filters: ReflashFilters | null = currentProgramId
    ? { programId: currentProgramId, stageId: stageId === ALL ? undefined : stageId }
    : null;
  const list = useReflashQuery(filters);
  const done = useReflashDoneMutation();
  const canFlash = softwareCan.recordFlash(user?.role);

  const exportCsv = async () => {
    if (!filters) return;
    setExporting(true);
    setNotice(null);
    try {
      const name = await downloadWithToken(reflashCsvPath(filters), `reflash-${currentProgram?.code ?? 'program'}.csv`);
      setNotice({ tone: 'success', message: `Saved ${name}.` });
    } catch (error) {
      setNotice({ tone: 'danger', message: errorMessage(error) });
    } finally {
      setExporting(false);
    }
  };

  const markDone = (entry: ReflashEntry) => {
    if (!entry.flashTo) return;
    setNotice(null);
    done.mutate(
      { assetId: entry.assetId, ecuId: entry.ecuId, version: entry.flashTo, recordVersion: entry.recordVersion ?? undefined },
      {
        onSuccess: () => setNotice({ tone: 'success', message: `Recorded: ${entry.ecuCode} on ${entry.tag} flashed to ${entry.flashTo}.` }),
        onError: (error) => setNotice({ tone: 'danger', message: errorMessage(error) }),
      },
    );
  };

  const header = (
    <View style={styles.gap}>
      <SoftwareHeader place="reflash" title="Reflash list" />
      <Select
        label="Stage"
        value={stageId}
        onChange={setStageId}
        options={[{ value: ALL, label: 'All stages' }, ...(stages.data ?? []).filter((s) => !s.retired).map((s) => ({ value: s.id, label: s.name }))]}
        testID="reflash-stage"
      />
      <Button
        label="Export CSV"
        icon="download"
        variant="secondary"
        compact
        loading={exporting}
        onPress={() => void exportCsv()}
        accessibilityHint="Downloads the reflash list of the chosen stage"
        testID="reflash-export"
      />
      {notice ? <Notice tone={notice.tone} message={notice.message} testID="reflash-notice" /> : null}
      {list.data ? (
        <Text tone="muted" testID="reflash-total">
          {list.data.items.length} ECU{list.data.items.length === 1 ? '' : 's'} to flash on {list.data.assets} asset
          {list.data.assets === 1 ? '' : 's'}.
        </Text>
      ) : null}
      {list.data?.stagesWithoutBaseline.length ? (
        <Notice
          tone="warning"
          message={`No released baseline for ${list.data.stagesWithoutBaseline.map((s) => s.name).join(', ')}: nothing on ${
            list.data.stagesWithoutBaseline.length === 1 ? 'it' : 'them'
          } can be listed.`}
        />
      ) : null}
      {list.isPending && filters ? <LoadingState label="Loading the reflash list…" /> : null}
      {list.isError ? <ErrorState message={errorMessage(list.error)} onRetry={() => void list.refetch()} retrying={list.isFetching} /> : null}
    </View>
  );

  return (
    <Screen scroll={false} testID="software-reflash-screen">
      <FlatList
        testID="reflash-list"
        data={list.data?.items ?? []}
        keyExtractor={(entry) => `${entry.assetId}-${entry.ecuId}`}
        ListHeaderComponent={header}
        ListEmptyComponent={list.data ? <EmptyState title="Nothing to flash" message="Every ECU is on its baseline." /> : null}
        contentContainerStyle={styles.gap}
        renderItem={({ item }) => (
          <ReflashCard
            entry={item}
            wide={isWide}
            canFlash={canFlash}
            busy={done.isPending && done.variables?.assetId === item.assetId && done.variables.ecuId === item.ecuId}
            onDone={() => markDone(item)}
          />
        )}
      />
    </Screen>
  );
}

function ReflashCard({ entry, wide, canFlash, busy, onDone }: { entry: ReflashEntry; wide: boolean; canFlash: boolean; busy: boolean; onDone: () => void }) {
  return (
    <Card style={[styles.card, wide && styles.cardWide]} testID={`reflash-entry-${entry.tag}-${entry.ecuCode}`}>
      <View style={styles.cardText}>
        <View style={styles.line}>
          <LinkPressable href={`/assets/${entry.assetId}/software`} style={styles.link} accessibilityLabel={`Software of ${entry.tag}`}>
            <Text variant="bodyStrong" tone="primary" style={styles.underline}>
              {entry.tag}
            </Text>
          </LinkPressable>
          <Text variant="bodyStrong">
            {entry.ecuCode} · {entry.ecuName}
          </Text>
          <StatusTag status={entry.status} />
        </View>
        <Text>
          {entry.installed ?? 'Nothing installed'} → {entry.flashTo ?? 'see the reason'}
        </Text>
        <Text tone="muted">
          {entry.reason}
          {entry.location ? ` · ${entry.location}` : ''} · {entry.stage}
        </Text>
      </View>
      {canFlash && entry.flashTo ? (
        <Button
          label="Mark flashed"
          compact
          loading={busy}
          onPress={onDone}
          accessibilityLabel={`Mark ${entry.ecuCode} on ${entry.tag} flashed to ${entry.flashTo}`}
          testID={`reflash-done-${entry.tag}-${entry.ecuCode}`}
        />
      ) : null}
    </Card>
  );
}

const styles = StyleSheet.create({
  gap: {
    gap: spacing.md,
  },
  card: {
    gap: spacing.sm,
  },
  cardWide: {
    flexDirection: 'row',
    alignItems: 'center',
  },
  cardText: {
    flex: 1,
    gap: spacing.xs,
  },
  line: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    alignItems: 'center',
    gap: spacing.sm,
  },
  link: {
    minHeight: sizes.touch,
    justifyContent: 'center',
  },
  underline: {
    textDecorationLine: 'underline',
  },
});
