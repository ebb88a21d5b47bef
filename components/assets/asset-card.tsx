import { Image, StyleSheet, View } from 'react-native';
import { Icon } from '@/components/ui/icon';
import { LinkPressable } from '@/components/ui/link-pressable';
import { ProgressBar } from '@/components/ui/progress-bar';
import { Text } from '@/components/ui/text';
import { useFocusRing } from '@/components/ui/use-focus-ring';
import { colors, radii, shadows, sizes, spacing } from '@/components/theme/tokens';
import { ASSET_KIND_LABELS, type AssetSummary } from '@/shared/schemas/assets';
import { NotClearedBadge, StatusBadge } from './asset-status';
import { progressCaption, progressFraction } from './asset-words';

const THUMB = 64;

/** One asset in the phone list: the whole card opens it. */
export function AssetCard({ asset }: { asset: AssetSummary }) {
  const ring = useFocusRing();
  const tid = `asset-card-${asset.tag}`;
  // The link is named by what the card shows (tag first), so the words seen are the words heard.
  return (
    <LinkPressable
      href={`/assets/${asset.id}`}
      testID={tid}
      onFocus={ring.onFocus}
      onBlur={ring.onBlur}
      style={({ pressed }) => [styles.card, !asset.cleared && styles.cardAlert, pressed && styles.pressed, ring.focused && styles.focused]}
    >
      <View style={styles.top}>
        {asset.thumbnailUrl ? (
          <Image source={{ uri: asset.thumbnailUrl }} style={styles.thumb} accessibilityIgnoresInvertColors alt="" />
        ) : (
          <View style={[styles.thumb, styles.noThumb]}>
            <Icon name="image" color={colors.textMuted} />
          </View>
        )}
        <View style={styles.heading}>
          <Text variant="title" numberOfLines={1} testID={`${tid}-tag`}>
            {asset.tag}
          </Text>
          <Text tone="muted" numberOfLines={1}>
            {asset.stage} · {ASSET_KIND_LABELS[asset.kind]}
          </Text>
          {asset.location ? (
            <Text variant="caption" tone="muted" numberOfLines={1}>
              {asset.location}
            </Text>
          ) : null}
        </View>
        <StatusBadge status={asset.status} testID={`${tid}-status`} />
      </View>
      {asset.cleared ? null : <NotClearedBadge reason={asset.notClearedReason} testID={`${tid}-not-cleared`} />}
      <ProgressBar
        value={progressFraction(asset.checklist)}
        label={`Checklist progress of ${asset.tag}`}
        caption={progressCaption(asset.checklist)}
        size="sm"
        testID={`${tid}-progress`}
      />
    </LinkPressable>
  );
}

const styles = StyleSheet.create({
  card: {
    backgroundColor: colors.surface,
    borderRadius: radii.lg,
    borderWidth: 1,
    borderColor: colors.border,
    padding: spacing.md,
    gap: spacing.sm,
    ...shadows.card,
  },
  cardAlert: {
    borderColor: colors.danger,
  },
  pressed: {
    backgroundColor: colors.surfaceMuted,
  },
  focused: {
    outlineColor: colors.focus,
    outlineStyle: 'solid',
    outlineWidth: sizes.focusRing,
    outlineOffset: 2,
  },
  top: {
    flexDirection: 'row',
    alignItems: 'flex-start',
    gap: spacing.md,
  },
  thumb: {
    width: THUMB,
    height: THUMB,
    borderRadius: radii.md,
    backgroundColor: colors.surfaceMuted,
  },
  noThumb: {
    alignItems: 'center',
    justifyContent: 'center',
  },
  heading: {
    flex: 1,
    minWidth: 0,
  },
});
