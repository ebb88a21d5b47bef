import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { Screen } from '@/components/ui/screen';
import { EmptyState, ErrorState, LoadingState, Notice } from '@/components/ui/states';
import { Heading, Text } from '@/components/ui/text';
import { TextLink } from '@/components/ui/text-link';
import { PageTitle } from '@/components/ui/page-title';
import { colors, spacing } from '@/components/theme/tokens';
import { errorMessage } from '@/hooks/api/api-client';
import { softwareConflictCurrent, useAssetSoftwareQuery, useRecordFlashMutation } from '@/hooks/queries/software';
import { useBreakpoints } from '@/hooks/use-breakpoints';
import { useSession } from '@/hooks/use-session';
import type { AssetSoftware, EcuSoftware } from '@/shared/schemas/software';
import { FlashForm, type FlashValues } from './flash-form';
import { formatDateTime, softwareCan } from './software-words';
import { StatusTag } from './status-tag';

/** One asset's software: per ECU installed against target, the rules it breaks and every earlier flash. */
export function AssetSoftwareScreen({ assetId }: { assetId: string }) {
  const software = useAssetSoftwareQuery(assetId);
  const { isWide } = useBreakpoints();
  const { user } = useSession();

  if (software.isPending) return <LoadingState label="Loading the software…" />;
  if (software.isError || !software.data) {
    return (
      <Screen>
        <TextLink href={`/assets/${assetId}`} label="Back to the asset" />
        <ErrorState message={errorMessage(software.error)} onRetry={() => void software.refetch()} retrying={software.isFetching} />
      </Screen>
    );
  }
  const data = software.data;
  return (
    <Screen testID="asset-software">
      <PageTitle title={`${data.tag} software`} />
      <TextLink href={`/assets/${assetId}`} label={`Back to ${data.tag}`} testID="asset-software-back" />
      <Heading level={1} variant="title">
        Software of {data.tag}
      </Heading>
      <Text tone="muted" testID="asset-software-baseline">
        {data.stage} ·{' '}
        {data.baseline
          ? `baseline ${data.baseline.name}${data.baseline.releaseLabel ? ` (${data.baseline.releaseLabel})` : ''}: ${data.score.onBaseline} of ${data.score.expected} ECUs on it`
          : 'no released baseline for this stage: nothing to compare with'}
      </Text>
      {data.ecus.length === 0 ? <EmptyState title="No ECUs recorded" message="Import a read-out or record a flash." /> : null}
      <View style={isWide ? styles.grid : styles.list}>
        {data.ecus.map((ecu) => (
          <EcuCard key={ecu.ecu.id} assetId={assetId} item={ecu} canFlash={softwareCan.recordFlash(user?.role)} wide={isWide} />
        ))}
      </View>
      <RulesCard software={data} />
    </Screen>
  );
}

function RulesCard({ software }: { software: AssetSoftware }) {
  if (software.rules.length === 0) return null;
  const words = { holds: 'Holds', broken: 'Broken', 'cannot-check': 'Cannot be checked', 'not-triggered': 'Does not apply' } as const;
  return (
    <Card style={styles.gap} testID="asset-software-rules">
      <Heading level={2} variant="heading">
        Compatibility rules
      </Heading>
      {software.rules.map(({ rule, state, whenInstalled, thenInstalled }) => (
        <View key={rule.id} style={styles.ruleRow}>
          <Text tone={state === 'broken' ? 'danger' : 'default'} weight={state === 'broken' ? 'semibold' : undefined}>
            {words[state]}: when {rule.whenEcuCode} is {rule.whenMinVersion} or later, {rule.thenEcuCode} must be {rule.range}
          </Text>
          <Text variant="caption" tone="muted">
            Installed: {rule.whenEcuCode} {whenInstalled ?? 'none'}, {rule.thenEcuCode} {thenInstalled ?? 'none'}
          </Text>
        </View>
      ))}
    </Card>
  );
}

function EcuCard({ assetId, item, canFlash, wide }: { assetId: string; item: EcuSoftware; canFlash: boolean; wide: boolean }) {
  const [open, setOpen] = useState(false);
  const [showAll, setShowAll] = useState(false);
  const code = item.ecu.code;
  const history = showAll ? item.history : item.history.slice(0, 3);
  return (
    <Card style={[styles.gap, wide && styles.gridItem]} testID={`asset-ecu-${code}`}>
      <View style={styles.headRow}>
        <Heading level={2} variant="heading">
          {code}
        </Heading>
        <Text tone="muted" style={styles.flex}>
          {item.ecu.name}
          {item.ecu.supplier ? ` · ${item.ecu.supplier}` : ''}
        </Text>
        <StatusTag status={item.status} testID={`asset-ecu-${code}-status`} />
      </View>
      <Text testID={`asset-ecu-${code}-versions`}>
        Installed {item.installed?.softwareVersion ?? 'nothing'} · target {item.target ?? 'none'}
      </Text>
      {item.installed ? (
        <Text variant="caption" tone="muted">
          Flashed {formatDateTime(item.installed.flashedAt)}
          {item.installed.flashedBy ? ` by ${item.installed.flashedBy.name}` : ''} ({item.installed.source === 'import' ? 'import' : 'by hand'})
          {item.installed.softwareNumber ? ` · SW ${item.installed.softwareNumber}` : ''}
          {item.installed.hardwareNumber ? ` · HW ${item.installed.hardwareNumber}` : ''}
          {item.installed.ecuSerial ? ` · serial ${item.installed.ecuSerial}` : ''}
        </Text>
      ) : null}
      {item.note ? <Text tone="warning">{item.note}</Text> : null}
      {item.rulesBroken.map((broken) => (
        <Notice key={broken.rule.id} message={broken.message} testID={`asset-ecu-${code}-rule`} />
      ))}
      {item.history.length ? (
        <View style={styles.history} accessibilityLabel={`Flashes of ${code}`}>
          <Text variant="label">History</Text>
          {history.map((flash, i) => {
            // Hardware number and serial show where they changed from the flash before (a part swapped).
            const older = item.history[i + 1];
            const hardwareChanged = older && flash.hardwareNumber && flash.hardwareNumber !== older.hardwareNumber;
            const serialChanged = older && flash.ecuSerial && flash.ecuSerial !== older.ecuSerial;
            return (
              <Text key={flash.id} variant="caption">
                {flash.softwareVersion} · {formatDateTime(flash.flashedAt)}
                {flash.flashedBy ? ` · ${flash.flashedBy.name}` : ''} · {flash.source === 'import' ? 'import' : 'by hand'}
                {hardwareChanged ? ` · HW now ${flash.hardwareNumber}` : ''}
                {serialChanged ? ` · serial now ${flash.ecuSerial}` : ''}
                {flash.note ? ` · ${flash.note}` : ''}
              </Text>
            );
          })}
          {item.history.length > 3 ? (
            <Button
              label={showAll ? 'Show fewer' : `Show all ${item.history.length} flashes`}
              variant="ghost"
              compact
              onPress={() => setShowAll((v) => !v)}
            />
          ) : null}
        </View>
      ) : null}
      {canFlash ? (
        open ? (
          <RecordFlash assetId={assetId} item={item} onClose={() => setOpen(false)} />
        ) : (
          <Button
            label="Record a flash"
            variant="secondary"
            compact
            onPress={() => setOpen(true)}
            accessibilityLabel={`Record a flash of ${code}`}
            testID={`asset-ecu-${code}-record`}
          />
        )
      ) : null}
    </Card>
  );
}

function RecordFlash({ assetId, item, onClose }: { assetId: string; item: EcuSoftware; onClose: () => void }) {
  const code = item.ecu.code;
  const [conflict, setConflict] = useState<string | null>(null);
  const record = useRecordFlashMutation(assetId);

  const send = async (values: FlashValues) => {
    setConflict(null);
    try {
      await record.mutateAsync({ ecuId: item.ecu.id, ...values, version: item.installed?.version });
      onClose();
    } catch (failure) {
      const current = softwareConflictCurrent(failure);
      if (!current) throw failure;
      const now = current.ecus.find((e) => e.ecu.id === item.ecu.id)?.installed;
      setConflict(
        `${errorMessage(failure)} ${code} now shows ${now?.softwareVersion ?? 'nothing'}${now?.flashedBy ? `, recorded by ${now.flashedBy.name}` : ''}. Check it, then record again if it is still needed.`,
      );
    }
  };

  return (
    <View style={styles.form}>
      {conflict ? <Notice tone="warning" message={conflict} testID={`asset-ecu-${code}-conflict`} /> : null}
      <FlashForm
        // A newer record (someone else's flash) starts the form again from it.
        key={item.installed?.version ?? 'none'}
        ecuCode={code}
        version={item.target ?? item.installed?.softwareVersion ?? ''}
        installed={item.installed}
        testID={`asset-ecu-${code}-form`}
        onSubmit={send}
        onCancel={onClose}
      />
    </View>
  );
}

const styles = StyleSheet.create({
  gap: {
    gap: spacing.sm,
  },
  list: {
    gap: spacing.md,
  },
  grid: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.md,
  },
  gridItem: {
    flexBasis: 420,
    flexGrow: 1,
  },
  headRow: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    alignItems: 'center',
    gap: spacing.sm,
  },
  flex: {
    flex: 1,
  },
  ruleRow: {
    gap: spacing.xxs,
    borderTopWidth: 1,
    borderTopColor: colors.border,
    paddingTop: spacing.sm,
  },
  history: {
    gap: spacing.xxs,
  },
  form: {
    gap: spacing.md,
  },
  actions: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.sm,
  },
});
