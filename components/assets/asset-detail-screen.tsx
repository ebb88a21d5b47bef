import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { AssetFindingsCard } from '@/components/findings/asset-findings-card';
import { AssetReadinessCard } from '@/components/readiness/asset-readiness-card';
import { PhotoCount, PhotoGrid } from '@/components/photos/photo-grid';
import { PhotoPicker } from '@/components/photos/photo-picker';
import { Button } from '@/components/ui/button';
import { Badge } from '@/components/ui/chip';
import { Columns, DetailHeader, Fact, Section } from '@/components/ui/detail';
import { PageTitle } from '@/components/ui/page-title';
import { ProgressBar } from '@/components/ui/progress-bar';
import { Screen } from '@/components/ui/screen';
import { ErrorState, LoadingState, Notice } from '@/components/ui/states';
import { Text } from '@/components/ui/text';
import { TextLink } from '@/components/ui/text-link';
import { colors, spacing } from '@/components/theme/tokens';
import { errorMessage } from '@/hooks/api/api-client';
import { useAssetQuery } from '@/hooks/queries/assets';
import { useStagesQuery } from '@/hooks/queries/stages';
import { useBreakpoints } from '@/hooks/use-breakpoints';
import { useSession } from '@/hooks/use-session';
import { ASSET_KIND_LABELS, type AssetDetail } from '@/shared/schemas/assets';
import { AssetEditForm } from './asset-edit-form';
import { AssetHistory } from './asset-history';
import { NotClearedCaution, StatusBadge } from './asset-status';
import { formatDate, formatDateTime, formatKm, progressCaption, progressFraction } from './asset-words';
import { MoveStagePanel } from './move-stage-panel';
import { can } from './permissions';
import { VinCheckSummary } from './vin-field';

export function AssetDetailScreen({ assetId }: { assetId: string }) {
  const asset = useAssetQuery(assetId);
  if (asset.isPending) {
    return (
      <Screen>
        <LoadingState label="Loading the asset…" />
      </Screen>
    );
  }
  if (asset.isError) {
    return (
      <Screen>
        <TextLink href="/assets" label="Back to assets" />
        <ErrorState message={errorMessage(asset.error)} onRetry={() => void asset.refetch()} retrying={asset.isFetching} />
      </Screen>
    );
  }
  return <AssetDetail asset={asset.data} />;
}

function AssetDetail({ asset }: { asset: AssetDetail }) {
  const { user } = useSession();
  const { isWide } = useBreakpoints();
  const stages = useStagesQuery(asset.programId);
  const [mode, setMode] = useState<'view' | 'edit' | 'move'>('view');
  const [notice, setNotice] = useState<string | null>(null);
  const done = (message: string) => {
    setMode('view');
    setNotice(message || null);
  };

  const overview =
    mode === 'edit' ? (
      <AssetEditForm asset={asset} onDone={done} />
    ) : (
      <Section
        title="Overview"
        action={
          can.editAsset(user?.role) ? (
            <Button label="Edit" variant="secondary" compact accessibilityLabel={`Edit ${asset.tag}`} onPress={() => setMode('edit')} testID="asset-edit-open" />
          ) : null
        }
        testID="asset-overview"
      >
        <Fact label="Kind">{ASSET_KIND_LABELS[asset.kind]}</Fact>
        <Fact label="Status">
          <StatusBadge status={asset.status} testID="asset-status" />
        </Fact>
        <Fact label="Location">{asset.location || '—'}</Fact>
        <Fact label="VIN">
          <View style={styles.vin}>
            <Text selectable testID="asset-vin-value">
              {asset.vin ?? 'None recorded'}
            </Text>
            {asset.vinCheck ? <VinCheckSummary check={asset.vinCheck} testID="asset-vin-check" /> : null}
          </View>
        </Fact>
        <Fact label="Odometer">{formatKm(asset.odometerKm)}</Fact>
        <Fact label="Build date">{formatDate(asset.buildDate)}</Fact>
        <Fact label="Last change">{formatDateTime(asset.updatedAt)}</Fact>
        {asset.notes ? <Fact label="Notes">{asset.notes}</Fact> : null}
      </Section>
    );

  const stageCard = (
    <Section
      title="Stage"
      action={
        can.moveStage(user?.role) && mode !== 'move' ? (
          <Button label="Move to stage" variant="secondary" compact onPress={() => setMode('move')} testID="asset-move-stage" />
        ) : null
      }
      testID="asset-stage-card"
    >
      <Text variant="title" testID="asset-stage">
        {asset.stage}
      </Text>
      {mode === 'move' ? (
        stages.data ? (
          <MoveStagePanel asset={asset} stages={stages.data} onDone={done} />
        ) : stages.isError ? (
          <ErrorState message={errorMessage(stages.error)} onRetry={() => void stages.refetch()} />
        ) : (
          <LoadingState label="Loading stages…" />
        )
      ) : null}
      <StageHistory asset={asset} />
    </Section>
  );

  const checklistCard = (
    <Section title={`Checklist · ${asset.stage}`} testID="asset-checklist-summary">
      <ProgressBar
        value={progressFraction(asset.checklist)}
        label="Checklist progress"
        caption={`${progressCaption(asset.checklist)} · ${asset.checklist.requiredDone} of ${asset.checklist.requiredTotal} required for the gate`}
      />
      <TextLink href={`/assets/${asset.id}/checklist`} label="Open the checklist" testID="asset-checklist-link" />
    </Section>
  );

  const photosCard = (
    <Section title="Photos" testID="asset-photos">
      <PhotoCount count={asset.photos.length} />
      <PhotoGrid photos={asset.photos} label={asset.tag} testID="asset-photo-grid" />
      <PhotoPicker assetId={asset.id} testID="asset-add-photo" label="Add photo" />
    </Section>
  );

  const historyCard = (
    <Section title="History">
      <AssetHistory assetId={asset.id} />
    </Section>
  );

  return (
    <Screen testID="asset-detail">
      <PageTitle title={asset.tag} />
      <TextLink href="/assets" label="Back to assets" testID="asset-back" />
      <DetailHeader
        eyebrow={`${asset.program.code} · ${ASSET_KIND_LABELS[asset.kind]}`}
        title={asset.tag}
        titleVariant="display"
        titleTestID="asset-tag"
        badges={
          <>
            <StatusBadge status={asset.status} />
            <Badge label={asset.stage} tone="primary" />
            {asset.location ? <Badge label={asset.location} /> : null}
          </>
        }
        aside={<TextLink href={`/assets/${asset.id}/label`} label="Label" testID="asset-label-link" />}
      />
      {asset.cleared ? null : <NotClearedCaution reason={asset.notClearedReason} />}
      {notice ? <Notice tone="success" message={notice} testID="asset-notice" /> : null}
      <AssetReadinessCard assetId={asset.id} />
      <AssetFindingsCard assetId={asset.id} programId={asset.programId} />
      <TextLink href={`/assets/${asset.id}/campaigns`} label="Test campaigns" testID="asset-campaigns-link" />
      <TextLink href={`/assets/${asset.id}/software`} label="Software" testID="asset-software-link" />
      {isWide ? (
        <Columns
          left={
            <>
              {overview}
              {stageCard}
            </>
          }
          right={
            <>
              {checklistCard}
              {photosCard}
              {historyCard}
            </>
          }
        />
      ) : (
        <>
          {checklistCard}
          {overview}
          {stageCard}
          {photosCard}
          {historyCard}
        </>
      )}
    </Screen>
  );
}

function StageHistory({ asset }: { asset: AssetDetail }) {
  if (asset.stageHistory.length === 0) return null;
  const visits = [...asset.stageHistory].sort((a, b) => b.enteredAt.localeCompare(a.enteredAt));
  return (
    <View style={styles.visits} testID="asset-stage-history">
      <Text variant="label">Stage history</Text>
      {visits.map((visit, index) => {
        const current = visit.leftAt === null;
        return (
          <View key={visit.id ?? `${visit.stageId}-${index}`} style={styles.visit}>
            <View style={styles.visitHead}>
              <Text variant="bodyStrong">{visit.stage}</Text>
              {current ? <Badge label="Current" tone="success" /> : null}
            </View>
            <Text variant="caption" tone="muted">
              {current
                ? `Since ${formatDate(visit.enteredAt)}`
                : `${formatDate(visit.enteredAt)} to ${formatDate(visit.leftAt)}`}
              {visit.by ? ` · moved by ${visit.by}` : ''}
            </Text>
            <ProgressBar value={progressFraction(visit.checklist)} label={`Checklist of ${visit.stage}`} caption={progressCaption(visit.checklist)} size="sm" />
            {!current && visit.id ? (
              <TextLink href={`/assets/${asset.id}/checklist?visitId=${visit.id}`} label={`Read the ${visit.stage} checklist`} />
            ) : null}
          </View>
        );
      })}
    </View>
  );
}

const styles = StyleSheet.create({
  vin: {
    gap: spacing.xs,
  },
  visits: {
    gap: spacing.md,
  },
  visit: {
    gap: spacing.xxs,
    paddingTop: spacing.sm,
    borderTopWidth: 1,
    borderTopColor: colors.border,
  },
  visitHead: {
    flexDirection: 'row',
    alignItems: 'center',
    gap: spacing.sm,
  },
});
