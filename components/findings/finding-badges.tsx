import { StyleSheet, View } from 'react-native';
import { Badge } from '@/components/ui/chip';
import { Icon } from '@/components/ui/icon';
import { Text } from '@/components/ui/text';
import { colors, radii, sizes, spacing } from '@/components/theme/tokens';
import { FINDING_SEVERITY_LABELS, FINDING_STATUS_LABELS, type FindingSeverity, type FindingStatus } from '@/shared/schemas/findings';
import { SAFETY_CAUTION, SEVERITY_TONES, STATUS_TONES } from './finding-words';

export function SeverityBadge({ severity, testID }: { severity: FindingSeverity; testID?: string }) {
  if (severity === 'safety') {
    return (
      <View style={styles.safety} testID={testID}>
        <Icon name="warning" size={sizes.iconXs} color={colors.danger} />
        <Text variant="caption" weight="semibold" tone="danger">
          {FINDING_SEVERITY_LABELS.safety}
        </Text>
      </View>
    );
  }
  return <Badge label={FINDING_SEVERITY_LABELS[severity]} tone={SEVERITY_TONES[severity]} testID={testID} />;
}

export function FindingStatusBadge({ status, testID }: { status: FindingStatus; testID?: string }) {
  return <Badge label={FINDING_STATUS_LABELS[status]} tone={STATUS_TONES[status]} testID={testID} />;
}

export function OverdueBadge({ testID }: { testID?: string }) {
  return <Badge label="Overdue" tone="danger" testID={testID} />;
}

/** The safety caution (PRODUCT.md section 6), defers to the site's procedures. */
export function SafetyCaution({ testID = 'finding-safety-caution' }: { testID?: string }) {
  return (
    <View style={styles.caution} accessibilityRole="alert" testID={testID}>
      <Icon name="warning" size={sizes.icon} color={colors.danger} />
      <Text tone="danger" style={styles.cautionText}>
        {SAFETY_CAUTION}
      </Text>
    </View>
  );
}

const styles = StyleSheet.create({
  safety: {
    flexDirection: 'row',
    alignItems: 'center',
    gap: spacing.xxs,
    alignSelf: 'flex-start',
    backgroundColor: colors.dangerTint,
    borderColor: colors.danger,
    borderWidth: 1,
    borderRadius: radii.pill,
    paddingHorizontal: spacing.sm,
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
  },
});
