import { useId, useState, type CSSProperties } from 'react';
import { StyleSheet, View } from 'react-native';
import { Text } from '@/components/ui/text';
import { colors, radii, sizes, spacing, typeScale } from '@/components/theme/tokens';
import type { DayFieldProps } from './day-field';

/**
 * The browser's own date picker (`<input type="date">`): a calendar on a desktop, a wheel on a
 * phone, typed digits for a keyboard. It holds `YYYY-MM-DD`, or nothing while a day is half typed.
 */
export function DayField({ label, value, onChange, error, hint, testID }: DayFieldProps) {
  const id = useId().replace(/[^a-zA-Z0-9_-]/g, '');
  const [focused, setFocused] = useState(false);
  const message = error ?? hint;
  const style: CSSProperties = { ...inputBase, ...(error ? inputError : null), ...(focused ? inputFocused : null) };
  return (
    <View style={styles.field}>
      <label htmlFor={id} style={labelStyle}>
        <Text variant="label">{label}</Text>
      </label>
      <input
        id={id}
        type="date"
        value={value}
        onChange={(event) => onChange(event.target.value)}
        onFocus={() => setFocused(true)}
        onBlur={() => setFocused(false)}
        aria-invalid={error ? true : undefined}
        aria-describedby={message ? `${id}-message` : undefined}
        data-testid={testID}
        style={style}
      />
      {message ? (
        <Text variant="caption" tone={error ? 'danger' : 'muted'} nativeID={`${id}-message`} aria-live={error ? 'polite' : undefined}>
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
  maxWidth: 280,
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
