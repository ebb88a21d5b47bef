import { TextField } from '@/components/ui/text-field';

export type DateFieldProps = {
  label: string;
  /** DayField: `YYYY-MM-DD`; DateTimeField: local `YYYY-MM-DDTHH:MM` (a space instead of the T is read too). Empty for none. */
  value: string;
  onChange: (value: string) => void;
  error?: string;
  hint?: string;
  testID?: string;
};

/** A day typed as text (the web has the browser's own picker: date-field.web.tsx). */
export function DayField({ label, value, onChange, error, hint, testID }: DateFieldProps) {
  return (
    <TextField
      label={label}
      value={value}
      onChangeText={(text) => onChange(text.trim())}
      placeholder="2026-12-31"
      autoCorrect={false}
      autoCapitalize="none"
      inputMode="numeric"
      error={error}
      hint={hint ?? 'Year-month-day.'}
      testID={testID}
    />
  );
}

/** A date and time typed as text, with the format as a hint (the web has the browser's own picker). */
export function DateTimeField({ label, value, onChange, error, hint, testID }: DateFieldProps) {
  return (
    <TextField
      label={label}
      value={value.replace('T', ' ')}
      onChangeText={(text) => onChange(text.trim().replace(' ', 'T'))}
      placeholder="2026-12-03 08:00"
      autoCorrect={false}
      autoCapitalize="none"
      inputMode="numeric"
      error={error}
      hint={hint ?? 'Year-month-day hour:minute, 24-hour clock.'}
      testID={testID}
    />
  );
}
