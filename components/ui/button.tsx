import { ActivityIndicator, Pressable, StyleSheet, View, type GestureResponderEvent } from 'react-native';
import { colors, radii, sizes, spacing } from '@/components/theme/tokens';
import { Icon, type IconName } from './icon';
import { Text } from './text';
import { useFocusRing } from './use-focus-ring';

export type ButtonVariant = 'primary' | 'secondary' | 'ghost' | 'danger';

export type ButtonProps = {
  label: string;
  onPress?: (event: GestureResponderEvent) => void;
  variant?: ButtonVariant;
  icon?: IconName;
  loading?: boolean;
  disabled?: boolean;
  fullWidth?: boolean;
  compact?: boolean;
  /** Defaults to the label; give one when the label alone is ambiguous ("Edit" -> "Edit Ana Ruiz"). */
  accessibilityLabel?: string;
  accessibilityHint?: string;
  testID?: string;
};

export function Button({
  label,
  onPress,
  variant = 'primary',
  icon,
  loading = false,
  disabled = false,
  fullWidth = false,
  compact = false,
  accessibilityLabel,
  accessibilityHint,
  testID,
}: ButtonProps) {
  const { focused, onFocus, onBlur } = useFocusRing();
  const inactive = disabled || loading;
  const palette = variants[variant];

  return (
    <Pressable
      accessibilityRole="button"
      accessibilityLabel={accessibilityLabel ?? label}
      accessibilityHint={accessibilityHint}
      aria-disabled={inactive}
      aria-busy={loading}
      disabled={inactive}
      onPress={onPress}
      onFocus={onFocus}
      onBlur={onBlur}
      testID={testID}
      style={({ pressed }) => [
        styles.base,
        compact ? styles.compact : styles.regular,
        { backgroundColor: pressed ? palette.pressed : palette.bg, borderColor: palette.border },
        fullWidth && styles.fullWidth,
        inactive && styles.inactive,
        focused && styles.focused,
      ]}
    >
      <View style={styles.content}>
        {loading ? (
          <ActivityIndicator size="small" color={palette.fg} />
        ) : icon ? (
          <Icon name={icon} size={sizes.iconSm} color={palette.fg} />
        ) : null}
        <Text variant="bodyStrong" weight="semibold" style={{ color: palette.fg }} numberOfLines={1}>
          {label}
        </Text>
      </View>
    </Pressable>
  );
}

const variants: Record<ButtonVariant, { bg: string; pressed: string; fg: string; border: string }> = {
  primary: { bg: colors.primary, pressed: colors.primaryPressed, fg: colors.onPrimary, border: colors.primary },
  secondary: { bg: colors.surface, pressed: colors.surfaceMuted, fg: colors.primary, border: colors.borderStrong },
  ghost: { bg: 'transparent', pressed: colors.surfaceMuted, fg: colors.primary, border: 'transparent' },
  danger: { bg: colors.surface, pressed: colors.dangerTint, fg: colors.danger, border: colors.danger },
};

const styles = StyleSheet.create({
  base: {
    borderRadius: radii.md,
    borderWidth: 1,
    justifyContent: 'center',
    alignItems: 'center',
    alignSelf: 'flex-start',
  },
  regular: {
    minHeight: sizes.control,
    paddingHorizontal: spacing.xl,
  },
  compact: {
    minHeight: sizes.touch,
    paddingHorizontal: spacing.lg,
  },
  fullWidth: {
    alignSelf: 'stretch',
  },
  content: {
    flexDirection: 'row',
    alignItems: 'center',
    gap: spacing.sm,
  },
  inactive: {
    opacity: 0.55,
  },
  focused: {
    outlineColor: colors.focus,
    outlineStyle: 'solid',
    outlineWidth: sizes.focusRing,
    outlineOffset: 2,
  },
});
