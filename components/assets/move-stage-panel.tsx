import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { Button } from '@/components/ui/button';
import { Select } from '@/components/ui/select';
import { Notice } from '@/components/ui/states';
import { Text } from '@/components/ui/text';
import { colors, radii, spacing } from '@/components/theme/tokens';
import { errorMessage } from '@/hooks/api/api-client';
import { conflictCurrent, useMoveAssetStageMutation } from '@/hooks/queries/assets';
import type { AssetDetail, Stage } from '@/shared/schemas/assets';

/** Choose the next stage, read what will happen, confirm. */
export function MoveStagePanel({
  asset,
  stages,
  onDone,
}: {
  asset: AssetDetail;
  stages: readonly Stage[];
  onDone: (message: string) => void;
}) {
  const move = useMoveAssetStageMutation(asset.id);
  const choices = stages.filter((stage) => !stage.retired && stage.id !== asset.stageId);
  const next = choices.find((stage) => stage.position > (stages.find((s) => s.id === asset.stageId)?.position ?? -1));
  const [target, setTarget] = useState<string | null>(next?.id ?? choices[0]?.id ?? null);
  const [error, setError] = useState<string | null>(null);
  const chosen = choices.find((stage) => stage.id === target) ?? null;

  const confirm = async () => {
    if (!chosen) return;
    setError(null);
    try {
      await move.mutateAsync({ stageId: chosen.id, version: asset.version });
      onDone(`Moved to ${chosen.name}. Its checklist has started.`);
    } catch (cause) {
      setError(
        conflictCurrent(cause)
          ? 'Someone else changed this asset a moment ago. The page now shows their version: check it, then move again.'
          : errorMessage(cause),
      );
    }
  };

  if (choices.length === 0) {
    return <Notice tone="warning" message="There is no other stage to move to. A lead can add stages on the Stages page." />;
  }

  return (
    <View style={styles.panel} testID="move-stage-panel">
      <Select
        label="Move to stage"
        layout="list"
        options={choices.map((stage) => ({ value: stage.id, label: stage.name, testID: `move-stage-option-${stage.name}` }))}
        value={target}
        onChange={setTarget}
        testID="move-stage-options"
      />
      {chosen ? (
        <View style={styles.explain}>
          <Text>
            A new checklist is started from the {chosen.name} template. The checklist of {asset.stage} is kept with its
            answers and photos, and can still be read from the stage history.
          </Text>
        </View>
      ) : null}
      {error ? <Notice message={error} testID="move-stage-error" /> : null}
      <View style={styles.buttons}>
        <Button
          label={chosen ? `Move to ${chosen.name}` : 'Move'}
          onPress={() => void confirm()}
          loading={move.isPending}
          disabled={!chosen}
          testID="move-stage-confirm"
        />
        <Button label="Cancel" variant="ghost" onPress={() => onDone('')} testID="move-stage-cancel" />
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  panel: {
    gap: spacing.md,
  },
  explain: {
    padding: spacing.md,
    borderRadius: radii.md,
    backgroundColor: colors.primaryTint,
  },
  buttons: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.sm,
  },
});
