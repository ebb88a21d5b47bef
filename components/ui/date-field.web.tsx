import { useId, useState, type CSSProperties } from 'react';
import { StyleSheet, View } from 'react-native';
import { Text } from '@/components/ui/text';
import { colors, radii, sizes, spacing, typeScale } from '@/components/theme/tokens';
import type { DateFieldProps } from './date-field';

/** A day: the browser's `<input type="date">`, holding `YYYY-MM-DD`, or nothing while a day is half typed. */
export function DayField(props: DateFieldProps) {
  return <BrowserPicker {...props} type="date" maxWidth={280} />;
}

/** A date and time: `<input type="datetime-local">`, `YYYY-MM-DDTHH:MM` in the device's time zone (as the native field holds it), in 5-minute steps. */
export function DateTimeField(props: DateFieldProps) {
  return <BrowserPicker {...props} type="datetime-local" step={300} />;
}

/**
 * The browser's own picker: a calendar on a desktop, a wheel on a phone, typed digits for a
 * keyboard; labelled, with its hint or error tied to it and the product's focus ring.
 */
function BrowserPicker({
  label,
  value,
  onChange,
  error,
  hint,
  testID,
  type,
  step,
  maxWidth,
}: DateFieldProps & { type: 'date' | 'datetime-local'; step?: number; maxWidth?: number }) {
  const id = useId().replace(/[^a-zA-Z0-9_-]/g, '');
  const [focused, setFocused] = useState(false);
  const message = error ?? hint;
  const style: CSSProperties = { ...inputBase, maxWidth, ...(error ? inputError : null), ...(focused ? inputFocused : null) };
  return (
    <View style={styles.field}>
      <label htmlFor={id} style={labelStyle}>
        <Text variant="label">{label}</Text>
      </label>
      <input
        id={id}
        type={type}
        value={value}
        step={step}
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
