import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { Chip } from '@/components/ui/chip';
import { TextField } from '@/components/ui/text-field';
import { formatDate } from '@/components/assets/asset-words';
import { spacing } from '@/components/theme/tokens';
import { dayFrom } from './finding-words';

const QUICK: { label: string; days: number }[] = [
  { label: 'Today', days: 0 },
  { label: 'In 3 days', days: 3 },
  { label: 'In a week', days: 7 },
  { label: 'In 2 weeks', days: 14 },
];

/** A due date: quick choices for a thumb, or a typed YYYY-MM-DD; empty for none. */
export function DueDateField({
  value,
  onChange,
  error,
  testID = 'finding-due',
}: {
  value: string;
  onChange: (value: string) => void;
  error?: string;
  testID?: string;
}) {
  const [today] = useState(() => new Date());
  return (
    <View style={styles.wrap}>
      <TextField
        label="Due date (optional)"
        value={value}
        onChangeText={(text) => onChange(text.trim())}
        placeholder="2026-12-31"
        inputMode="numeric"
        autoCorrect={false}
        error={error}
        hint={value && /^\d{4}-\d{2}-\d{2}$/.test(value) ? formatDate(value) : 'Year-month-day, or a quick choice below.'}
        testID={testID}
      />
      <View style={styles.chips} role="group" aria-label="Quick due dates">
        {QUICK.map((choice) => {
          const date = dayFrom(today, choice.days);
          return (
            <Chip key={choice.label} label={choice.label} selected={value === date} onPress={() => onChange(date)} testID={`${testID}-${choice.days}`} />
          );
        })}
        {value ? <Chip label="No due date" onPress={() => onChange('')} testID={`${testID}-none`} /> : null}
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: {
    gap: spacing.sm,
  },
  chips: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.sm,
  },
});
