import { useMemo } from 'react';
import { ScrollView, StyleSheet, View } from 'react-native';
import { Chip } from '@/components/ui/chip';
import { EmptyState } from '@/components/ui/states';
import { Heading } from '@/components/ui/text';
import { spacing } from '@/components/theme/tokens';
import type { Assignment } from '@/shared/schemas/fleet';
import { AssignmentCard } from './assignment-card';
import { addDays, dayKey, formatLongDay } from './fleet-time';
import { heldUntil } from './fleet-words';

/** The assignments that hold a vehicle at some time of `day` (local), soonest first. */
export function assignmentsOfDay(assignments: readonly Assignment[], day: Date, now: number): Assignment[] {
  const from = day.getTime();
  const to = addDays(day, 1).getTime();
  return assignments
    .filter((a) => a.status !== 'cancelled' && Date.parse(a.startsAt) < to && heldUntil(a, now) > from)
    .sort((x, y) => Date.parse(x.startsAt) - Date.parse(y.startsAt) || x.assetTag.localeCompare(y.assetTag));
}

/** The phone's plan: pick a day from the strip, then that day's assignments as cards. */
export function FleetDayList({
  assignments,
  from,
  days,
  day,
  onDay,
  conflicts,
  now,
}: {
  assignments: readonly Assignment[];
  from: Date;
  days: number;
  day: Date;
  onDay: (day: Date) => void;
  conflicts: ReadonlySet<string>;
  now: number;
}) {
  const strip = useMemo(() => Array.from({ length: days }, (_, i) => addDays(from, i)), [from, days]);
  const todayKey = dayKey(new Date(now));
  const chosenKey = dayKey(day);
  const items = assignmentsOfDay(assignments, day, now);

  return (
    <View style={styles.wrap} testID="fleet-day-list">
      <ScrollView horizontal showsHorizontalScrollIndicator={false} contentContainerStyle={styles.strip} role="radiogroup" aria-label="Day">
        {strip.map((d) => {
          const key = dayKey(d);
          const count = assignmentsOfDay(assignments, d, now).length;
          const label = `${d.toLocaleDateString('en-GB', { weekday: 'short', day: 'numeric' })}${key === todayKey ? ' (today)' : ''}`;
          return (
            <Chip
              key={key}
              kind="radio"
              label={label}
              accessibilityLabel={`${formatLongDay(d)}${key === todayKey ? ', today' : ''}: ${count === 1 ? '1 assignment' : `${count} assignments`}`}
              selected={key === chosenKey}
              onPress={() => onDay(d)}
              testID={`fleet-day-${key}`}
            />
          );
        })}
      </ScrollView>
      <Heading level={2} variant="heading" testID="fleet-day-title">
        {formatLongDay(day)}
        {chosenKey === todayKey ? ' (today)' : ''}
      </Heading>
      {items.length === 0 ? (
        <EmptyState title="Nothing booked on this day." message="Pick another day, or book a vehicle." testID="fleet-day-empty" />
      ) : (
        <View style={styles.cards} role="list">
          {items.map((a) => (
            <View key={a.id} role="listitem">
              <AssignmentCard assignment={a} conflicts={conflicts} />
            </View>
          ))}
        </View>
      )}
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: {
    gap: spacing.md,
  },
  strip: {
    gap: spacing.xs,
    paddingVertical: spacing.xxs,
  },
  cards: {
    gap: spacing.sm,
  },
});
