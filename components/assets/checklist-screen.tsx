import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { Checkbox } from '@/components/ui/checkbox';
import { PageTitle } from '@/components/ui/page-title';
import { ProgressBar } from '@/components/ui/progress-bar';
import { Screen } from '@/components/ui/screen';
import { EmptyState, ErrorState, LoadingState, Notice } from '@/components/ui/states';
import { Heading, Text } from '@/components/ui/text';
import { TextLink } from '@/components/ui/text-link';
import { colors, spacing } from '@/components/theme/tokens';
import { errorMessage } from '@/hooks/api/api-client';
import { useAssetQuery, useChecklistQuery } from '@/hooks/queries/assets';
import { useSession } from '@/hooks/use-session';
import { SYSTEM_LABELS, type Checklist } from '@/shared/schemas/assets';
import { NotClearedCaution } from './asset-status';
import { progressCaption, progressFraction } from './asset-words';
import { ChecklistItemCard } from './checklist-item-card';
import { can } from './permissions';

/** The configuration checklist of an asset's current stage (or, with `visitId`, of a stage it has left). */
export function ChecklistScreen({ assetId, visitId }: { assetId: string; visitId?: string }) {
  const checklist = useChecklistQuery(assetId, visitId);
  const asset = useAssetQuery(assetId);
  const { user } = useSession();
  const [onlyOpen, setOnlyOpen] = useState(false);
  const tag = asset.data?.tag ?? 'the asset';

  return (
    <Screen testID="checklist-screen">
      <PageTitle title={asset.data ? `Checklist ${asset.data.tag}` : 'Checklist'} />
      <TextLink href={`/assets/${assetId}`} label={`Back to ${tag}`} testID="checklist-back" />
      {checklist.isPending ? (
        <LoadingState label="Loading the checklist…" />
      ) : checklist.isError ? (
        <ErrorState message={errorMessage(checklist.error)} onRetry={() => void checklist.refetch()} retrying={checklist.isFetching} />
      ) : (
        <ChecklistBody
          checklist={checklist.data}
          tag={tag}
          readOnly={checklist.data.current === false || !can.workChecklist(user?.role)}
          roleReadOnly={!can.workChecklist(user?.role)}
          onlyOpen={onlyOpen}
          setOnlyOpen={setOnlyOpen}
          notCleared={asset.data && !asset.data.cleared ? asset.data.notClearedReason : undefined}
        />
      )}
    </Screen>
  );
}

function ChecklistBody({
  checklist,
  tag,
  readOnly,
  roleReadOnly,
  onlyOpen,
  setOnlyOpen,
  notCleared,
}: {
  checklist: Checklist;
  tag: string;
  readOnly: boolean;
  roleReadOnly: boolean;
  onlyOpen: boolean;
  setOnlyOpen: (value: boolean) => void;
  /** The not-cleared reason, or undefined when the asset is cleared. */
  notCleared?: string | null;
}) {
  const { progress } = checklist;
  return (
    <>
      <View style={styles.header}>
        <Text variant="caption" tone="muted">
          {tag}
        </Text>
        <Heading level={1} variant="title">
          Checklist · {checklist.stage}
        </Heading>
        <ProgressBar
          value={progressFraction(progress)}
          label="Checklist progress"
          caption={`${progressCaption(progress)} · ${progress.requiredDone} of ${progress.requiredTotal} required for the gate`}
          testID="checklist-progress"
        />
      </View>
      {notCleared !== undefined ? <NotClearedCaution reason={notCleared} /> : null}
      {checklist.current === false ? (
        <Notice tone="warning" message="This checklist belongs to a stage the asset has left. It can be read, not changed." testID="checklist-closed" />
      ) : roleReadOnly ? (
        <Notice tone="warning" message="Your role can read this checklist; technicians, engineers and leads fill it in." />
      ) : null}
      <Checkbox label="Only items still to do" checked={onlyOpen} onChange={setOnlyOpen} testID="checklist-only-open" />
      {checklist.groups.length === 0 ? (
        <EmptyState title="This stage's checklist has no items." message="Engineers and leads add items to the stage's template." />
      ) : null}
      {checklist.groups.map((group) => {
        const items = onlyOpen ? group.items.filter((item) => item.state === 'open' || item.state === 'deviation') : group.items;
        return (
          <View key={group.system} style={styles.group} testID={`checklist-group-${group.system}`}>
            <View style={styles.groupHead}>
              <Heading level={2} variant="heading">
                {SYSTEM_LABELS[group.system]}
              </Heading>
              <ProgressBar
                value={progressFraction(group.progress)}
                label={`${SYSTEM_LABELS[group.system]} progress`}
                caption={progressCaption(group.progress)}
                size="sm"
                testID={`checklist-group-${group.system}-progress`}
              />
            </View>
            {items.length === 0 ? (
              <Text tone="muted">Everything here is done.</Text>
            ) : (
              items.map((item) => <ChecklistItemCard key={item.id} item={item} readOnly={readOnly} />)
            )}
          </View>
        );
      })}
    </>
  );
}

const styles = StyleSheet.create({
  header: {
    gap: spacing.sm,
  },
  group: {
    gap: spacing.md,
    paddingTop: spacing.md,
    borderTopWidth: 1,
    borderTopColor: colors.border,
  },
  groupHead: {
    gap: spacing.xs,
  },
});
