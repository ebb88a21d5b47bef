import { useRouter } from 'expo-router';
import { useEffect, useMemo, useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { Button } from '@/components/ui/button';
import { Select, type SelectOption } from '@/components/ui/select';
import { Screen } from '@/components/ui/screen';
import { ErrorState, LoadingState, Notice } from '@/components/ui/states';
import { Text } from '@/components/ui/text';
import { TextField } from '@/components/ui/text-field';
import { TextLink } from '@/components/ui/text-link';
import { colors, radii, sizes, spacing } from '@/components/theme/tokens';
import { useAssetListQuery } from '@/hooks/queries/assets';
import { useAssignmentsQuery, useDriversQuery } from '@/hooks/queries/fleet';
import { useStagesQuery } from '@/hooks/queries/stages';
import { useBreakpoints } from '@/hooks/use-breakpoints';
import { useSession } from '@/hooks/use-session';
import { ASSIGNMENT_PURPOSES, ASSIGNMENT_PURPOSE_LABELS, type AssignmentPurpose } from '@/shared/schemas/fleet';
import { FleetDayList } from './fleet-day-list';
import { FleetHeader } from './fleet-header';
import { addDays, dayKey, formatDay, formatDayTime, parseDay, startOfDay } from './fleet-time';
import { FleetTimeline, type TimelineRow } from './fleet-timeline';
import { conflictingIds, fleetErrorMessage, isFleetManager } from './fleet-words';
import { MyDrivesScreen } from './my-drives-screen';

export type FleetParams = {
  start?: string;
  day?: string;
  days?: string;
  stage?: string;
  purpose?: string;
  driver?: string;
};

const ALL = 'all';
const isPurpose = (value: string | undefined): value is AssignmentPurpose => ASSIGNMENT_PURPOSES.includes(value as AssignmentPurpose);

/** Monday of the week of `date` (local). */
function weekStart(date: Date): Date {
  const day = startOfDay(date);
  return addDays(day, -((day.getDay() + 6) % 7));
}

/** A driver's own drives; everyone else sees the program's plan (coordinators and leads also book from it). */
export function FleetScreen({ params }: { params: FleetParams }) {
  const { user } = useSession();
  if (user?.role === 'driver') return <MyDrivesScreen />;
  return <FleetPlan params={params} />;
}

/** Ticks every minute, so overdue returns and the now line move on an open page. */
function useNow(): number {
  const [now, setNow] = useState(() => Date.now());
  useEffect(() => {
    const timer = setInterval(() => setNow(Date.now()), 60_000);
    return () => clearInterval(timer);
  }, []);
  return now;
}

function FleetPlan({ params }: { params: FleetParams }) {
  const router = useRouter();
  const { user, currentProgramId } = useSession();
  const { isWide, width } = useBreakpoints();
  const now = useNow();
  const manager = isFleetManager(user?.role);

  const from = useMemo(() => parseDay(params.start) ?? weekStart(new Date()), [params.start]);
  const days = params.days === '7' ? 7 : 14;
  const to = addDays(from, days);
  const stageId = params.stage || undefined;
  const purpose = isPurpose(params.purpose) ? params.purpose : undefined;
  const driverId = params.driver || undefined;
  const todayInRange = now >= from.getTime() && now < to.getTime();
  const askedDay = parseDay(params.day);
  const day = askedDay && askedDay >= from && askedDay < to ? askedDay : todayInRange ? startOfDay(new Date(now)) : from;

  const [filtersOpen, setFiltersOpen] = useState(false);
  const [startText, setStartText] = useState(dayKey(from));
  useEffect(() => setStartText(dayKey(from)), [from]);

  const stages = useStagesQuery(currentProgramId);
  const drivers = useDriversQuery(currentProgramId);
  const list = useAssignmentsQuery(
    currentProgramId ? { programId: currentProgramId, from: from.toISOString(), to: to.toISOString(), stageId, purpose, driverId } : null,
  );
  const overdue = useAssignmentsQuery(currentProgramId ? { programId: currentProgramId, overdue: true } : null);
  const vehicles = useAssetListQuery(currentProgramId ? { programId: currentProgramId, kind: 'vehicle', stage: stageId, sort: 'tag', dir: 'asc' } : null);

  const items = useMemo(() => list.data?.items ?? [], [list.data]);
  const conflicts = useMemo(() => conflictingIds(items, now), [items, now]);

  const rows: TimelineRow[] = useMemo(() => {
    const fromAssignments = new Map<string, TimelineRow>();
    for (const a of items) fromAssignments.set(a.assetId, { id: a.assetId, tag: a.assetTag, stage: a.vehicle.stage });
    // With a purpose or driver filter on, only the vehicles those assignments use are of interest.
    if (purpose || driverId) return [...fromAssignments.values()].sort((x, y) => x.tag.localeCompare(y.tag));
    const all = new Map<string, TimelineRow>();
    for (const page of vehicles.data?.pages ?? []) {
      for (const v of page.items) if (v.status !== 'retired' || fromAssignments.has(v.id)) all.set(v.id, { id: v.id, tag: v.tag, stage: v.stage });
    }
    for (const [id, row] of fromAssignments) if (!all.has(id)) all.set(id, row);
    return [...all.values()].sort((x, y) => x.tag.localeCompare(y.tag));
  }, [items, vehicles.data, purpose, driverId]);

  const set = (change: Partial<Record<keyof FleetParams, string | undefined>>) => router.setParams(change);
  const move = (deltaDays: number) => set({ start: dayKey(addDays(from, deltaDays)), day: undefined });
  const commitStart = () => {
    const parsed = parseDay(startText);
    if (parsed) set({ start: dayKey(parsed), day: undefined });
    else setStartText(dayKey(from));
  };

  const stageOptions: SelectOption<string>[] = [{ value: ALL, label: 'Any stage' }, ...(stages.data ?? []).filter((s) => !s.retired).map((s) => ({ value: s.id, label: s.name }))];
  const purposeOptions: SelectOption<string>[] = [{ value: ALL, label: 'Any purpose' }, ...ASSIGNMENT_PURPOSES.map((p) => ({ value: p, label: ASSIGNMENT_PURPOSE_LABELS[p] }))];
  const driverOptions: SelectOption<string>[] = [{ value: ALL, label: 'Any driver' }, ...(drivers.data ?? []).map((d) => ({ value: d.userId, label: d.name }))];
  const filterCount = [stageId, purpose, driverId].filter(Boolean).length;

  const filters = (
    <View style={styles.filters} testID="fleet-filters">
      <Select label="Stage" options={stageOptions} value={stageId ?? ALL} onChange={(v) => set({ stage: v === ALL ? undefined : v })} testID="fleet-filter-stage" />
      <Select label="Purpose" options={purposeOptions} value={purpose ?? ALL} onChange={(v) => set({ purpose: v === ALL ? undefined : v })} testID="fleet-filter-purpose" />
      <Select label="Driver" options={driverOptions} value={driverId ?? ALL} onChange={(v) => set({ driver: v === ALL ? undefined : v })} testID="fleet-filter-driver" />
    </View>
  );

  const contentWidth = Math.min(width - sizes.sideNav - spacing.xxl * 2, sizes.contentMaxWidth);
  const dayWidth = Math.max(112, Math.floor((contentWidth - 170) / days));
  const overdueItems = overdue.data?.items ?? [];
  const conflictCount = conflicts.size;

  return (
    <Screen testID="fleet-plan">
      <FleetHeader
        title="Fleet"
        actions={manager ? <Button label="Book a vehicle" icon="plus" compact onPress={() => router.push('/fleet/new')} testID="fleet-book-open" /> : null}
      />

      {overdueItems.length ? (
        <View style={styles.overdue} accessibilityRole="alert" testID="fleet-overdue">
          <Text variant="bodyStrong" tone="danger">
            {overdueItems.length === 1 ? '1 vehicle not back on time' : `${overdueItems.length} vehicles not back on time`} (checked out, past the end of the window)
          </Text>
          {overdueItems.map((a) => (
            <TextLink
              key={a.id}
              href={`/fleet/assignments/${a.id}`}
              label={`${a.assetTag} · ${a.driver.name} · due back ${formatDayTime(a.endsAt)}`}
              testID={`fleet-overdue-${a.id}`}
            />
          ))}
        </View>
      ) : null}

      <View style={styles.toolbar}>
        <Button label={isWide ? `Previous ${days === 7 ? 'week' : '2 weeks'}` : 'Earlier'} icon="back" variant="secondary" compact onPress={() => move(-days)} testID="fleet-prev" />
        <Button label="This week" variant="ghost" compact onPress={() => set({ start: undefined, day: undefined })} testID="fleet-this-week" />
        <Button label={isWide ? `Next ${days === 7 ? 'week' : '2 weeks'}` : 'Later'} icon="chevron-right" variant="secondary" compact onPress={() => move(days)} testID="fleet-next" />
      </View>
      {isWide ? (
        <View style={styles.toolbar}>
          <View style={styles.startField}>
            <TextField
              label="From (year-month-day)"
              value={startText}
              onChangeText={setStartText}
              onBlur={commitStart}
              onSubmitEditing={commitStart}
              inputMode="numeric"
              autoCorrect={false}
              hint={`${formatDay(from)} to ${formatDay(addDays(to, -1))}`}
              testID="fleet-start"
            />
          </View>
          <Select
            label="Show"
            options={[
              { value: '7', label: '1 week' },
              { value: '14', label: '2 weeks' },
            ]}
            value={String(days)}
            onChange={(v) => set({ days: v === '14' ? undefined : v })}
            testID="fleet-days"
          />
        </View>
      ) : null}
      <View style={styles.toolbar}>
        <Button
          label={filtersOpen ? 'Hide filters' : filterCount ? `Filters: stage, purpose, driver (${filterCount} on)` : 'Filters: stage, purpose, driver'}
          icon={filtersOpen ? 'arrow-up' : 'chevron-down'}
          variant="secondary"
          compact
          onPress={() => setFiltersOpen((open) => !open)}
          testID="fleet-filters-toggle"
        />
        {filterCount ? (
          <Button label="Clear filters" variant="ghost" compact onPress={() => set({ stage: undefined, purpose: undefined, driver: undefined })} testID="fleet-filters-clear" />
        ) : null}
      </View>
      {filtersOpen ? filters : null}

      {!currentProgramId ? (
        <Notice message="Join a program to see its fleet." />
      ) : list.isPending ? (
        <LoadingState label="Loading the plan…" />
      ) : list.isError ? (
        <ErrorState message={fleetErrorMessage(list.error)} onRetry={() => void list.refetch()} retrying={list.isFetching} />
      ) : (
        <>
          <Text variant="caption" tone="muted" aria-live="polite" testID="fleet-summary">
            {summary(items.filter((a) => a.status !== 'cancelled').length, conflictCount)}
          </Text>
          {list.data?.truncated ? <Notice tone="warning" message="Only the first 1000 assignments are shown: narrow the period or the filters." /> : null}
          {conflictCount ? (
            <Notice tone="warning" message="Marked “Conflict”: a vehicle or a driver is held by two assignments at once, usually because a vehicle came back late. Open one to change it." testID="fleet-conflicts" />
          ) : null}
          {isWide ? (
            rows.length ? (
              <FleetTimeline rows={rows} assignments={items} from={from} days={days} dayWidth={dayWidth} conflicts={conflicts} now={now} />
            ) : (
              <Notice tone="warning" message="No vehicle matches the filters." />
            )
          ) : (
            <FleetDayList assignments={items} from={from} days={days} day={day} onDay={(d) => set({ day: dayKey(d) })} conflicts={conflicts} now={now} />
          )}
        </>
      )}
    </Screen>
  );
}

function summary(count: number, conflicts: number): string {
  const parts = [count === 1 ? '1 assignment in this period' : `${count} assignments in this period`];
  if (conflicts) parts.push(conflicts === 1 ? '1 in conflict' : `${conflicts} in conflict`);
  return parts.join(' · ');
}

const styles = StyleSheet.create({
  overdue: {
    gap: spacing.xxs,
    padding: spacing.md,
    borderRadius: radii.md,
    borderWidth: 1,
    borderColor: colors.danger,
    backgroundColor: colors.dangerTint,
  },
  toolbar: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.sm,
    alignItems: 'flex-start',
  },
  startField: {
    width: 240,
    maxWidth: '100%',
  },
  filters: {
    gap: spacing.md,
  },
});
