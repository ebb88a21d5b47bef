import { StyleSheet, View } from 'react-native';
import { Text } from '@/components/ui/text';
import { colors, radii, spacing } from '@/components/theme/tokens';

/** The product name with its amber proof mark. */
export function Wordmark({ size = 'heading' }: { size?: 'heading' | 'title' }) {
  return (
    <View style={styles.row} accessibilityRole="text" accessibilityLabel="Proofyard">
      <View style={[styles.mark, size === 'title' && styles.markLarge]} />
      <Text variant={size} tone="primary">
        Proofyard
      </Text>
    </View>
  );
}

const styles = StyleSheet.create({
  row: {
    flexDirection: 'row',
    alignItems: 'center',
    gap: spacing.sm,
  },
  mark: {
    width: spacing.md,
    height: spacing.md,
    borderRadius: radii.sm / 2,
    backgroundColor: colors.accent,
    transform: [{ rotate: '45deg' }],
  },
  markLarge: {
    width: spacing.lg,
    height: spacing.lg,
  },
});
