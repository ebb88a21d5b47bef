import { StyleSheet, View } from 'react-native';
import { Card } from '@/components/ui/card';
import { Icon } from '@/components/ui/icon';
import { LinkPressable } from '@/components/ui/link-pressable';
import { ErrorState, LoadingState } from '@/components/ui/states';
import { Heading, Text } from '@/components/ui/text';
import { TextLink } from '@/components/ui/text-link';
import { useFocusRing } from '@/components/ui/use-focus-ring';
import { colors, radii, sizes, spacing } from '@/components/theme/tokens';
import { errorMessage } from '@/hooks/api/api-client';
import { useStagesQuery } from '@/hooks/queries/stages';
import type { Stage } from '@/shared/schemas/assets';

/** Assets per stage of the current program, each a link to the filtered asset list. */
export function ProgramGlance({ programId, programCode }: { programId: string; programCode: string }) {
  const stages = useStagesQuery(programId);
  const shown = (stages.data ?? []).filter((stage) => !stage.retired || stage.assetCount > 0);
  const total = shown.reduce((sum, stage) => sum + stage.assetCount, 0);
  return (
    <Card testID="home-glance">
      <Heading level={2} variant="heading">
        Your program at a glance
      </Heading>
      {stages.isPending ? (
        <LoadingState label="Counting assets…" />
      ) : stages.isError ? (
        <ErrorState message={errorMessage(stages.error)} onRetry={() => void stages.refetch()} />
      ) : (
        <>
          <Text tone="muted">
            {programCode}: {total === 1 ? '1 asset' : `${total} assets`} across {shown.length === 1 ? '1 stage' : `${shown.length} stages`}.
          </Text>
          <View style={styles.list}>
            {shown.map((stage) => (
              <StageLink key={stage.id} stage={stage} />
            ))}
          </View>
          <TextLink href="/assets" label="See all assets" testID="home-assets-link" />
        </>
      )}
    </Card>
  );
}

function StageLink({ stage }: { stage: Stage }) {
  const ring = useFocusRing();
  const count = stage.assetCount === 1 ? '1 asset' : `${stage.assetCount} assets`;
  return (
    <LinkPressable
      href={`/assets?stage=${stage.id}`}
      accessibilityLabel={`${stage.name}: ${count}`}
      onFocus={ring.onFocus}
      onBlur={ring.onBlur}
      style={({ pressed }) => [styles.row, pressed && styles.pressed, ring.focused && styles.focused]}
      testID={`home-stage-${stage.position}`}
    >
      <Text variant="bodyStrong" style={styles.name} numberOfLines={1}>
        {stage.name}
      </Text>
      <Text tone="muted">{count}</Text>
      <Icon name="chevron-right" size={sizes.iconSm} color={colors.textMuted} />
    </LinkPressable>
  );
}

const styles = StyleSheet.create({
  list: {
    gap: spacing.xs,
  },
  row: {
    minHeight: sizes.touch,
    flexDirection: 'row',
    alignItems: 'center',
    gap: spacing.md,
    paddingHorizontal: spacing.md,
    borderRadius: radii.md,
    borderWidth: 1,
    borderColor: colors.border,
  },
  name: {
    flex: 1,
    minWidth: 0,
  },
  pressed: {
    backgroundColor: colors.surfaceMuted,
  },
  focused: {
    outlineColor: colors.focus,
    outlineStyle: 'solid',
    outlineWidth: sizes.focusRing,
  },
});
