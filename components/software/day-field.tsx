import { TextField } from '@/components/ui/text-field';

export type DayFieldProps = {
  label: string;
  /** `YYYY-MM-DD`, or empty for none. */
  value: string;
  onChange: (value: string) => void;
  error?: string;
  hint?: string;
  testID?: string;
};

/** A day typed as text (the web has its own picker). */
export function DayField({ label, value, onChange, error, hint, testID }: DayFieldProps) {
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
