import { useQueries } from '@tanstack/react-query';
import { useMemo } from 'react';
import { StyleSheet, View } from 'react-native';
import { Button } from '@/components/ui/button';
import { PageTitle } from '@/components/ui/page-title';
import { Screen } from '@/components/ui/screen';
import { EmptyState, ErrorState, LoadingState, Notice } from '@/components/ui/states';
import { Heading, Text } from '@/components/ui/text';
import { TextLink } from '@/components/ui/text-link';
import { spacing } from '@/components/theme/tokens';
import { errorMessage } from '@/hooks/api/api-client';
import { assetQueryOptions } from '@/hooks/queries/assets';
import { AssetLabel } from './asset-label';
import { assetUrl } from './asset-url';
import { LABELS_PER_SHEET, SHEET, type LabelData } from './label-data';
import { PrintSheet, canPrint, printLabels } from './print-sheet';

/** Ten sheets at most in one go: each label loads its asset. */
export const MAX_LABELS = LABELS_PER_SHEET * 10;

/** Printable QR labels for one asset or a selection (`/labels?ids=a,b,c`). */
export function LabelSheetScreen({ assetIds, backHref }: { assetIds: readonly string[]; backHref: string }) {
  const ids = useMemo(() => [...new Set(assetIds)].slice(0, MAX_LABELS), [assetIds]);
  const results = useQueries({ queries: ids.map((id) => assetQueryOptions(id)) });
  const labels: LabelData[] = results.flatMap((result) =>
    result.data
      ? [
          {
            id: result.data.id,
            tag: result.data.tag,
            url: assetUrl(result.data.id),
            programCode: result.data.program.code,
            programName: result.data.program.name,
            stage: result.data.stage,
          },
        ]
      : [],
  );
  const pending = results.some((result) => result.isPending);
  const failed = results.find((result) => result.isError);
  const single = ids.length === 1;
  const title = single && labels[0] ? `Label ${labels[0].tag}` : 'Labels';
  const sheets = Math.max(1, Math.ceil(labels.length / LABELS_PER_SHEET));

  return (
    <Screen testID="label-sheet">
      <PageTitle title={title} />
      <TextLink href={backHref} label={single ? 'Back to the asset' : 'Back to assets'} testID="labels-back" />
      <View style={styles.header}>
        <Heading level={1} variant="title">
          {title}
        </Heading>
        <Text tone="muted">
          {`Prints on A4 label stock of ${SHEET.columns} × ${SHEET.rows} (${SHEET.labelWidthMm} × ${Math.round(SHEET.labelHeightMm)} mm) with no page margins. Scanning a label opens the asset; people who are signed out sign in first.`}
        </Text>
      </View>
      {ids.length === 0 ? (
        <EmptyState title="No assets chosen." message="Select assets in the list on a wide screen, then choose Print labels." />
      ) : null}
      {assetIds.length > MAX_LABELS ? <Notice tone="warning" message={`Only the first ${MAX_LABELS} labels are shown. Print the rest in another round.`} /> : null}
      {failed ? <ErrorState message={errorMessage(failed.error)} onRetry={() => void failed.refetch()} /> : null}
      {pending ? <LoadingState label="Preparing labels…" /> : null}
      {labels.length > 0 ? (
        <>
          <View style={styles.actions}>
            {canPrint ? (
              <Button label={labels.length === 1 ? 'Print label' : `Print ${labels.length} labels`} icon="print" onPress={printLabels} disabled={pending} testID="labels-print" />
            ) : (
              <Notice tone="warning" message="Open this page in a browser to print." />
            )}
            <Text variant="caption" tone="muted">
              {sheets === 1 ? 'One sheet.' : `${sheets} sheets.`}
            </Text>
          </View>
          <View style={styles.grid} testID="label-preview">
            {labels.map((label) => (
              <AssetLabel key={label.id} label={label} />
            ))}
          </View>
          <PrintSheet labels={labels} />
        </>
      ) : null}
    </Screen>
  );
}

const styles = StyleSheet.create({
  header: {
    gap: spacing.xs,
  },
  actions: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    alignItems: 'center',
    gap: spacing.md,
  },
  grid: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.md,
  },
});
