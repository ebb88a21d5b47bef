import { useId, useState, type CSSProperties } from 'react';
import { StyleSheet, View } from 'react-native';
import { Text } from '@/components/ui/text';
import { colors, radii, sizes, spacing, typeScale } from '@/components/theme/tokens';
import type { DateTimeFieldProps } from './date-time-field';

/**
 * The browser's own date and time picker (`<input type="datetime-local">`): a wheel on a phone,
 * a calendar on a desktop, and typed digits for a keyboard. It holds `YYYY-MM-DDTHH:MM` in the
 * device's time zone, the same value the native text field holds.
 */
export function DateTimeField({ label, value, onChange, error, hint, testID }: DateTimeFieldProps) {
  const id = useId().replace(/[^a-zA-Z0-9_-]/g, '');
  const [focused, setFocused] = useState(false);
  const message = error ?? hint;
  const style: CSSProperties = {
    ...inputBase,
    ...(error ? inputError : null),
    ...(focused ? inputFocused : null),
  };
  return (
    <View style={styles.field}>
      <label htmlFor={id} style={labelStyle}>
        <Text variant="label">{label}</Text>
      </label>
      <input
        id={id}
        type="datetime-local"
        value={value}
        step={300}
        onChange={(event) => onChange(event.target.value)}
        onFocus={() => setFocused(true)}
        onBlur={() => setFocused(false)}
        aria-invalid={error ? true : undefined}
        aria-describedby={message ? `${id}-message` : undefined}
        data-testid={testID}
        style={style}
      />
      {message ? (
        <Text
          variant="caption"
          tone={error ? 'danger' : 'muted'}
          nativeID={`${id}-message`}
          aria-live={error ? 'polite' : undefined}
          testID={testID && error ? `${testID}-error` : undefined}
        >
          {message}
        </Text>
      ) : null}
    </View>
  );
}

const labelStyle: CSSProperties = { display: 'block' };

const inputBase: CSSProperties = {
  boxSizing: 'border-box',
  width: '100%',
  minHeight: sizes.control,
  border: `1px solid ${colors.borderStrong}`,
  borderRadius: radii.md,
  background: colors.surface,
  color: colors.text,
  padding: `${spacing.sm}px ${spacing.md}px`,
  fontSize: typeScale.body.fontSize,
  fontFamily: 'inherit',
  outline: 'none',
};
const inputError: CSSProperties = { border: `2px solid ${colors.danger}` };
const inputFocused: CSSProperties = { borderColor: colors.primary, outline: `${sizes.focusRing}px solid ${colors.focus}`, outlineOffset: 1 };

const styles = StyleSheet.create({
  field: {
    gap: spacing.xs,
    alignSelf: 'stretch',
  },
});
