import { StyleSheet, View, type ViewProps } from 'react-native';
import { colors, radii, shadows, spacing } from '@/components/theme/tokens';

export type CardProps = ViewProps & {
  padded?: boolean;
  tone?: 'default' | 'muted';
};

export function Card({ padded = true, tone = 'default', style, ...rest }: CardProps) {
  return <View style={[styles.card, padded && styles.padded, tone === 'muted' && styles.muted, style]} {...rest} />;
}

const styles = StyleSheet.create({
  card: {
    backgroundColor: colors.surface,
    borderRadius: radii.lg,
    borderWidth: 1,
    borderColor: colors.border,
    ...shadows.card,
  },
  padded: {
    padding: spacing.lg,
    gap: spacing.md,
  },
  muted: {
    backgroundColor: colors.surfaceMuted,
    shadowOpacity: 0,
    elevation: 0,
  },
});
