import { Pressable, StyleSheet, View } from 'react-native';
import { colors, radii, sizes, spacing } from '@/components/theme/tokens';
import { Icon } from './icon';
import { Text } from './text';
import { useFocusRing } from './use-focus-ring';

export type CheckboxProps = {
  label: string;
  checked: boolean;
  onChange: (checked: boolean) => void;
  /** Keep the label for screen readers only (a table's row selection). */
  hideLabel?: boolean;
  description?: string;
  disabled?: boolean;
  testID?: string;
};

/** One on/off choice with a 44 px target. */
export function Checkbox({ label, checked, onChange, hideLabel = false, description, disabled = false, testID }: CheckboxProps) {
  const { focused, onFocus, onBlur } = useFocusRing();
  return (
    <Pressable
      accessibilityRole="checkbox"
      accessibilityLabel={description ? `${label}, ${description}` : label}
      aria-checked={checked}
      aria-disabled={disabled}
      disabled={disabled}
      onPress={() => onChange(!checked)}
      onFocus={onFocus}
      onBlur={onBlur}
      testID={testID}
      style={[styles.row, hideLabel && styles.bare, disabled && styles.disabled, focused && styles.focused]}
    >
      <View style={[styles.box, checked && styles.boxOn]}>
        {checked ? <Icon name="check" size={sizes.iconXs} color={colors.onPrimary} /> : null}
      </View>
      {hideLabel ? null : (
        <View style={styles.text}>
          <Text variant="bodyStrong">{label}</Text>
          {description ? (
            <Text variant="caption" tone="muted">
              {description}
            </Text>
          ) : null}
        </View>
      )}
    </Pressable>
  );
}

const styles = StyleSheet.create({
  row: {
    minHeight: sizes.touch,
    flexDirection: 'row',
    alignItems: 'center',
    gap: spacing.md,
    borderRadius: radii.sm,
    alignSelf: 'stretch',
  },
  bare: {
    minWidth: sizes.touch,
    justifyContent: 'center',
    alignSelf: 'auto',
  },
  text: {
    flex: 1,
    minWidth: 0,
  },
  box: {
    width: sizes.indicator,
    height: sizes.indicator,
    borderRadius: radii.sm,
    borderWidth: 2,
    borderColor: colors.borderStrong,
    backgroundColor: colors.surface,
    alignItems: 'center',
    justifyContent: 'center',
  },
  boxOn: {
    backgroundColor: colors.primary,
    borderColor: colors.primary,
  },
  disabled: {
    opacity: 0.55,
  },
  focused: {
    outlineColor: colors.focus,
    outlineStyle: 'solid',
    outlineWidth: sizes.focusRing,
    outlineOffset: 2,
  },
});
