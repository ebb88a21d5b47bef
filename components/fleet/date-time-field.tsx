import { TextField } from '@/components/ui/text-field';

export type DateTimeFieldProps = {
  label: string;
  /** Local date and time, `YYYY-MM-DDTHH:MM` (a space instead of the T is read too). */
  value: string;
  onChange: (value: string) => void;
  error?: string;
  hint?: string;
  testID?: string;
};

/** A date and time typed as text, with the format as a hint (the web has its own picker). */
export function DateTimeField({ label, value, onChange, error, hint, testID }: DateTimeFieldProps) {
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
