import { useMemo } from 'react';
import { StyleSheet, View } from 'react-native';
import { Screen } from '@/components/ui/screen';
import { EmptyState, ErrorState, LoadingState, Notice } from '@/components/ui/states';
import { Heading, Text } from '@/components/ui/text';
import { spacing } from '@/components/theme/tokens';
import { useAssignmentsQuery } from '@/hooks/queries/fleet';
import { useSession } from '@/hooks/use-session';
import type { Assignment } from '@/shared/schemas/fleet';
import { AssignmentCard } from './assignment-card';
import { FleetHeader, RoadCaution } from './fleet-header';
import { HOUR_MS } from './fleet-time';
import { fleetErrorMessage } from './fleet-words';

/** A check-out may come this long before the window starts (the server's EARLY_CHECKOUT_HOURS). */
const EARLY_HOURS = 12;

export type DriveGroups = { now: Assignment[]; upcoming: Assignment[]; past: Assignment[] };

/**
 * Now: out with me, or ready to check out (its window open, or starting within 12 hours);
 * upcoming: planned later; past: returned, cancelled, or ended without being taken.
 */
export function groupDrives(items: readonly Assignment[], now: number): DriveGroups {
  const groups: DriveGroups = { now: [], upcoming: [], past: [] };
  for (const a of items) {
    const start = Date.parse(a.startsAt);
    const end = Date.parse(a.endsAt);
    if (a.status === 'checked-out') groups.now.push(a);
    else if (a.status === 'planned' && end > now && start - EARLY_HOURS * HOUR_MS <= now) groups.now.push(a);
    else if (a.status === 'planned' && end > now) groups.upcoming.push(a);
    else groups.past.push(a);
  }
  const byStart = (x: Assignment, y: Assignment) => Date.parse(x.startsAt) - Date.parse(y.startsAt);
  groups.now.sort(byStart);
  groups.upcoming.sort(byStart);
  groups.past.sort((x, y) => byStart(y, x));
  return groups;
}

export function MyDrivesScreen() {
  const { currentProgramId } = useSession();
  const list = useAssignmentsQuery(currentProgramId ? { programId: currentProgramId, mine: true } : null);
  const groups = useMemo(() => groupDrives(list.data?.items ?? [], Date.now()), [list.data]);

  return (
    <Screen testID="fleet-mine">
      <FleetHeader title="My drives" />
      <RoadCaution />
      {!currentProgramId ? (
        <Notice message="Join a program to see your drives." />
      ) : list.isPending ? (
        <LoadingState label="Loading your drives…" />
      ) : list.isError ? (
        <ErrorState message={fleetErrorMessage(list.error)} onRetry={() => void list.refetch()} retrying={list.isFetching} />
      ) : (
        <>
          <Group title="Now" empty="Nothing to take or bring back right now." items={groups.now} testID="mine-now" />
          <Group title="Upcoming" empty="No drives booked for you." items={groups.upcoming} testID="mine-upcoming" />
          <Group title="Past" empty="No past drives in the last 30 days." items={groups.past} testID="mine-past" />
        </>
      )}
    </Screen>
  );
}

function Group({ title, empty, items, testID }: { title: string; empty: string; items: Assignment[]; testID: string }) {
  return (
    <View style={styles.group} testID={testID}>
      <Heading level={2} variant="heading">
        {title}{' '}
        <Text variant="heading" tone="muted">
          ({items.length})
        </Text>
      </Heading>
      {items.length === 0 ? (
        <EmptyState title={empty} />
      ) : (
        <View style={styles.cards} role="list">
          {items.map((a) => (
            <View key={a.id} role="listitem">
              <AssignmentCard assignment={a} showDriver={false} />
            </View>
          ))}
        </View>
      )}
    </View>
  );
}

const styles = StyleSheet.create({
  group: {
    gap: spacing.sm,
  },
  cards: {
    gap: spacing.sm,
  },
});
