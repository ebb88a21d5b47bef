import { zodResolver } from '@hookform/resolvers/zod';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { StyleSheet, View } from 'react-native';
import { applyServerFieldErrors } from '@/components/form/server-errors';
import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { Notice } from '@/components/ui/states';
import { Heading, Text } from '@/components/ui/text';
import { colors, radii, spacing } from '@/components/theme/tokens';
import { errorMessage } from '@/hooks/api/api-client';
import { conflictCurrent, useUpdateAssetMutation } from '@/hooks/queries/assets';
import type { AssetDetail, UpdateAsset } from '@/shared/schemas/assets';
import { AssetFormFields, EditAssetFormSchema, type EditAssetFormInput, type EditAssetFormOutput } from './asset-form-fields';
import { changesBetween, type Change } from './history-words';

const FIELDS = ['tag', 'kind', 'status', 'location', 'vin', 'odometerKm', 'buildDate', 'notes'] as const;
type Field = (typeof FIELDS)[number];
type Editable = Pick<AssetDetail, Field>;

function editable(asset: AssetDetail): Editable {
  return {
    tag: asset.tag,
    kind: asset.kind,
    status: asset.status,
    location: asset.location,
    vin: asset.vin,
    odometerKm: asset.odometerKm,
    buildDate: asset.buildDate,
    notes: asset.notes,
  };
}

function formValues(asset: AssetDetail): EditAssetFormInput {
  return {
    tag: asset.tag,
    kind: asset.kind,
    status: asset.status,
    location: asset.location,
    vin: asset.vin ?? '',
    odometerKm: String(asset.odometerKm),
    buildDate: asset.buildDate ?? '',
    notes: asset.notes,
  };
}

/** Only the fields the user changed go to the server: someone else's edits to the others stay. */
function changedFields(base: Editable, draft: EditAssetFormOutput): Partial<Editable> {
  const out: Partial<Record<Field, unknown>> = {};
  for (const field of FIELDS) {
    if (JSON.stringify(draft[field] ?? null) !== JSON.stringify(base[field] ?? null)) out[field] = draft[field];
  }
  return out as Partial<Editable>;
}

type Conflict = { current: AssetDetail; mine: Partial<Editable> };

/**
 * Edits an asset with its version. When someone saved first (409), it shows their changes and
 * the user's side by side; the user's are sent again only when they say so.
 */
export function AssetEditForm({ asset, onDone }: { asset: AssetDetail; onDone: (message: string) => void }) {
  const update = useUpdateAssetMutation(asset.id);
  const [base, setBase] = useState(asset);
  const [conflict, setConflict] = useState<Conflict | null>(null);
  const [formError, setFormError] = useState<string | null>(null);
  const { control, handleSubmit, setError, reset } = useForm<EditAssetFormInput, unknown, EditAssetFormOutput>({
    resolver: zodResolver(EditAssetFormSchema),
    defaultValues: formValues(asset),
  });

  const send = async (change: Partial<Editable>, version: number) => {
    setFormError(null);
    if (Object.keys(change).length === 0) {
      onDone('Nothing was changed.');
      return;
    }
    try {
      await update.mutateAsync({ ...(change as Omit<UpdateAsset, 'version'>), version });
      setConflict(null);
      onDone('Saved.');
    } catch (error) {
      const current = conflictCurrent(error);
      if (current) {
        setConflict({ current, mine: change });
        return;
      }
      if (!applyServerFieldErrors(error, setError, FIELDS)) setFormError(errorMessage(error));
    }
  };

  const onSubmit = handleSubmit((values) => send(changedFields(editable(base), values), base.version));

  const discardMine = () => {
    if (!conflict) return;
    setBase(conflict.current);
    reset(formValues(conflict.current));
    setConflict(null);
  };

  const reapplyMine = () => {
    if (!conflict) return;
    setBase(conflict.current);
    void send(conflict.mine, conflict.current.version);
  };

  const theirs: Change[] = conflict ? changesBetween(editable(base), editable(conflict.current)) : [];
  const mine: Change[] = conflict ? changesBetween(editable(base), { ...editable(base), ...conflict.mine }) : [];

  return (
    <Card testID="asset-edit">
      <Heading level={2} variant="heading">
        Edit {base.tag}
      </Heading>
      {conflict ? (
        <View style={styles.conflict} accessibilityRole="alert" testID="asset-conflict">
          <Text variant="bodyStrong">Someone else saved this asset while you were editing it.</Text>
          <ChangeList title="Their changes" changes={theirs} empty="They changed nothing you can see here (perhaps the stage)." testID="asset-conflict-theirs" />
          <ChangeList title="Your changes, not saved yet" changes={mine} empty="None." testID="asset-conflict-mine" />
          <Text tone="muted">Re-apply yours on top of theirs, or keep theirs and drop yours.</Text>
          <View style={styles.buttons}>
            <Button label="Re-apply my changes" onPress={reapplyMine} loading={update.isPending} compact testID="asset-conflict-reapply" />
            <Button label="Keep theirs" variant="secondary" onPress={discardMine} compact testID="asset-conflict-discard" />
          </View>
        </View>
      ) : null}
      <AssetFormFields control={control} />
      {formError ? <Notice message={formError} testID="asset-edit-error" /> : null}
      <View style={styles.buttons}>
        <Button label="Save changes" onPress={() => void onSubmit()} loading={update.isPending} disabled={Boolean(conflict)} testID="asset-edit-save" />
        <Button label="Cancel" variant="ghost" onPress={() => onDone('')} testID="asset-edit-cancel" />
      </View>
    </Card>
  );
}

function ChangeList({ title, changes, empty, testID }: { title: string; changes: Change[]; empty: string; testID: string }) {
  return (
    <View style={styles.changes} testID={testID}>
      <Text variant="label">{title}</Text>
      {changes.length === 0 ? (
        <Text tone="muted">{empty}</Text>
      ) : (
        changes.map((change) => (
          <Text key={change.key}>
            <Text weight="semibold">{change.label}:</Text> {change.before} → {change.after}
          </Text>
        ))
      )}
    </View>
  );
}

const styles = StyleSheet.create({
  conflict: {
    gap: spacing.sm,
    padding: spacing.md,
    borderRadius: radii.md,
    borderWidth: 1,
    borderColor: colors.warning,
    backgroundColor: colors.warningTint,
  },
  changes: {
    gap: spacing.xxs,
  },
  buttons: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.sm,
  },
});
