import { StyleSheet, View } from 'react-native';
import { Badge } from '@/components/ui/chip';
import { Icon } from '@/components/ui/icon';
import { Text } from '@/components/ui/text';
import { colors, radii, sizes, spacing } from '@/components/theme/tokens';
import { ASSET_STATUS_LABELS, type AssetStatus } from '@/shared/schemas/assets';
import { NOT_CLEARED_CAUTION, STATUS_TONES, notClearedSentence } from './asset-words';

export function StatusBadge({ status, testID }: { status: AssetStatus; testID?: string }) {
  return <Badge label={ASSET_STATUS_LABELS[status]} tone={STATUS_TONES[status]} testID={testID} />;
}

/** The compact "Not cleared" mark of a list row: a warning sign, the words and the reason. */
export function NotClearedBadge({ reason, testID }: { reason: string | null; testID?: string }) {
  return (
    <View style={styles.badge} testID={testID}>
      <Icon name="warning" size={sizes.iconXs} color={colors.danger} />
      <Text variant="caption" weight="semibold" tone="danger" style={styles.text}>
        {notClearedSentence(reason)}
      </Text>
    </View>
  );
}

/** PRODUCT.md section 6: an open safety finding means the asset may not be driven or powered. */
export function NotClearedCaution({ reason }: { reason: string | null }) {
  return (
    <View style={styles.caution} accessibilityRole="alert" testID="asset-not-cleared">
      <Icon name="warning" size={sizes.icon} color={colors.danger} />
      <View style={styles.cautionText}>
        <Text variant="bodyStrong" tone="danger">
          {notClearedSentence(reason)}
        </Text>
        <Text tone="danger">{NOT_CLEARED_CAUTION}</Text>
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  badge: {
    flexDirection: 'row',
    alignItems: 'flex-start',
    gap: spacing.xs,
    alignSelf: 'flex-start',
    maxWidth: '100%',
    backgroundColor: colors.dangerTint,
    borderColor: colors.danger,
    borderWidth: 1,
    borderRadius: radii.sm,
    paddingHorizontal: spacing.sm,
    paddingVertical: spacing.xxs,
  },
  text: {
    flexShrink: 1,
  },
  caution: {
    flexDirection: 'row',
    gap: spacing.md,
    padding: spacing.lg,
    borderRadius: radii.lg,
    borderWidth: 2,
    borderColor: colors.danger,
    backgroundColor: colors.dangerTint,
  },
  cautionText: {
    flex: 1,
    gap: spacing.xs,
  },
});
