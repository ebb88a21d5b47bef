import { useMemo } from 'react';
import { ScrollView, StyleSheet, View } from 'react-native';
import { LinkPressable } from '@/components/ui/link-pressable';
import { Text } from '@/components/ui/text';
import { useFocusRing } from '@/components/ui/use-focus-ring';
import { colors, radii, sizes, spacing } from '@/components/theme/tokens';
import { ASSIGNMENT_STATUS_LABELS, type Assignment } from '@/shared/schemas/fleet';
import { addDays, dayKey, formatWindow } from './fleet-time';
import { assignmentFlags, heldUntil, purposeLabel } from './fleet-words';

export type TimelineRow = { id: string; tag: string; stage: string };

const LABEL_W = 168;
const HEADER_H = 48;
const LANE_H = 68;
const ROW_PAD = 4;
/** A bar is drawn at least this wide so its words stay readable; lanes are packed by drawn width. */
const MIN_BAR_W = 96;

type Placed = { a: Assignment; left: number; width: number; lane: number };

/** Bars of one row, placed by time and stacked in lanes so that no two drawn bars cover each other. */
export function placeBars(items: readonly Assignment[], from: number, dayWidth: number, now: number): { bars: Placed[]; lanes: number } {
  const pxPerMs = dayWidth / (24 * 3600_000);
  const sorted = [...items].sort((x, y) => Date.parse(x.startsAt) - Date.parse(y.startsAt));
  const laneEnds: number[] = [];
  const bars: Placed[] = [];
  for (const a of sorted) {
    const left = Math.max(0, (Date.parse(a.startsAt) - from) * pxPerMs);
    const right = (heldUntil(a, now) - from) * pxPerMs;
    const width = Math.max(MIN_BAR_W, right - left);
    let lane = laneEnds.findIndex((end) => end <= left);
    if (lane === -1) {
      lane = laneEnds.length;
      laneEnds.push(0);
    }
    laneEnds[lane] = left + width + 2;
    bars.push({ a, left, width, lane });
  }
  return { bars, lanes: Math.max(1, laneEnds.length) };
}

/**
 * Vehicles (rows) against days (columns), scrolled sideways on narrower windows. Each bar says
 * the driver and the purpose in words; an overdue return runs on to now and says so, as does a
 * conflict, so nothing rests on colour alone.
 */
export function FleetTimeline({
  rows,
  assignments,
  from,
  days,
  dayWidth,
  conflicts,
  now,
}: {
  rows: readonly TimelineRow[];
  assignments: readonly Assignment[];
  /** Local midnight of the first day. */
  from: Date;
  days: number;
  dayWidth: number;
  conflicts: ReadonlySet<string>;
  now: number;
}) {
  const start = from.getTime();
  const dayStarts = useMemo(() => Array.from({ length: days }, (_, i) => addDays(from, i)), [from, days]);
  const end = addDays(from, days).getTime();
  const byVehicle = useMemo(() => {
    const map = new Map<string, Assignment[]>();
    for (const a of assignments) {
      if (a.status === 'cancelled') continue;
      if (Date.parse(a.startsAt) >= end || heldUntil(a, now) <= start) continue;
      map.set(a.assetId, [...(map.get(a.assetId) ?? []), a]);
    }
    return map;
  }, [assignments, start, end, now]);
  const todayKey = dayKey(new Date(now));
  const nowLeft = now >= start && now < end ? ((now - start) / (24 * 3600_000)) * dayWidth : null;
  const width = days * dayWidth;

  return (
    <View style={styles.frame} testID="fleet-timeline">
      <View style={styles.labels}>
        <View style={[styles.corner, { height: HEADER_H }]}>
          <Text variant="label" tone="muted">
            Vehicle
          </Text>
        </View>
        {rows.map((row) => {
          const lanes = placeBars(byVehicle.get(row.id) ?? [], start, dayWidth, now).lanes;
          return <RowLabel key={row.id} row={row} height={lanes * LANE_H + ROW_PAD * 2} />;
        })}
      </View>
      <ScrollView horizontal style={styles.scroll} contentContainerStyle={{ width }} accessibilityLabel="Days">
        <View style={{ width }}>
          <View style={[styles.headerRow, { height: HEADER_H }]}>
            {dayStarts.map((day) => {
              const weekend = day.getDay() === 0 || day.getDay() === 6;
              const isToday = dayKey(day) === todayKey;
              return (
                <View key={dayKey(day)} style={[styles.dayHead, { width: dayWidth }, weekend && styles.weekend, isToday && styles.today]}>
                  <Text variant="caption" weight={isToday ? 'semibold' : 'medium'} tone={isToday ? 'primary' : 'muted'}>
                    {day.toLocaleDateString('en-GB', { weekday: 'short' })}
                    {isToday ? ' · today' : ''}
                  </Text>
                  <Text variant="label" weight={isToday ? 'semibold' : 'medium'}>
                    {day.toLocaleDateString('en-GB', { day: 'numeric', month: 'short' })}
                  </Text>
                </View>
              );
            })}
          </View>
          {rows.map((row) => {
            const { bars, lanes } = placeBars(byVehicle.get(row.id) ?? [], start, dayWidth, now);
            return (
              <View key={row.id} style={[styles.row, { height: lanes * LANE_H + ROW_PAD * 2 }]} role="group" accessibilityLabel={`${row.tag}: ${bars.length === 0 ? 'nothing booked' : `${bars.length} bookings`}`}>
                {dayStarts.map((day, i) => (
                  <View
                    key={dayKey(day)}
                    style={[styles.gridCell, { left: i * dayWidth, width: dayWidth }, (day.getDay() === 0 || day.getDay() === 6) && styles.weekend]}
                  />
                ))}
                {bars.map((bar) => (
                  <Bar key={bar.a.id} placed={bar} conflicts={conflicts} maxWidth={width - bar.left} />
                ))}
              </View>
            );
          })}
          {nowLeft !== null ? <View style={[styles.nowLine, { left: nowLeft }]} accessibilityElementsHidden importantForAccessibility="no" /> : null}
        </View>
      </ScrollView>
    </View>
  );
}

function RowLabel({ row, height }: { row: TimelineRow; height: number }) {
  const ring = useFocusRing();
  return (
    <LinkPressable
      href={`/fleet/new?assetId=${row.id}`}
      accessibilityLabel={`${row.tag}, ${row.stage}: book`}
      onFocus={ring.onFocus}
      onBlur={ring.onBlur}
      style={({ pressed }) => [styles.rowLabel, { height }, pressed && styles.pressed, ring.focused && styles.focused]}
      testID={`fleet-row-${row.id}`}
    >
      <Text variant="bodyStrong" numberOfLines={1}>
        {row.tag}
      </Text>
      <Text variant="caption" tone="muted" numberOfLines={1}>
        {row.stage}
      </Text>
      <Text variant="caption" tone="primary" weight="medium">
        Book ›
      </Text>
    </LinkPressable>
  );
}

function Bar({ placed, conflicts, maxWidth }: { placed: Placed; conflicts: ReadonlySet<string>; maxWidth: number }) {
  const ring = useFocusRing();
  const { a } = placed;
  const flags = assignmentFlags(a, conflicts).filter((f) => f.tone === 'danger');
  const status = ASSIGNMENT_STATUS_LABELS[a.status];
  // Said in the order the bar shows it (driver, purpose, flags or status), then what the bar leaves to its row and place.
  const spoken = [a.driver.name, purposeLabel(a), ...(flags.length ? flags.map((f) => f.label) : [status]), a.assetTag, formatWindow(a.startsAt, a.endsAt), ...(flags.length ? [status] : [])].join(', ');
  const tone = flags.length ? styles.barDanger : a.status === 'checked-out' ? styles.barOut : a.status === 'returned' ? styles.barDone : styles.barPlanned;
  return (
    <LinkPressable
      href={`/fleet/assignments/${a.id}`}
      accessibilityLabel={spoken}
      onFocus={ring.onFocus}
      onBlur={ring.onBlur}
      testID={`assignment-${a.id}`}
      style={({ pressed }) => [
        styles.bar,
        tone,
        { left: placed.left, width: Math.min(placed.width, maxWidth) - 2, top: ROW_PAD + placed.lane * LANE_H },
        pressed && styles.pressed,
        ring.focused && styles.focused,
      ]}
    >
      <Text variant="caption" weight="semibold" numberOfLines={1}>
        {a.driver.name}
      </Text>
      <Text variant="caption" numberOfLines={1}>
        {purposeLabel(a)}
      </Text>
      <Text variant="caption" weight={flags.length ? 'semibold' : 'regular'} tone={flags.length ? 'danger' : 'muted'} numberOfLines={1}>
        {flags.length ? flags.map((f) => f.label).join(' · ') : status}
      </Text>
    </LinkPressable>
  );
}

const styles = StyleSheet.create({
  frame: {
    flexDirection: 'row',
    borderWidth: 1,
    borderColor: colors.border,
    borderRadius: radii.lg,
    backgroundColor: colors.surface,
    overflow: 'hidden',
  },
  labels: {
    width: LABEL_W,
    borderRightWidth: 1,
    borderRightColor: colors.border,
  },
  corner: {
    justifyContent: 'center',
    paddingHorizontal: spacing.md,
    borderBottomWidth: 1,
    borderBottomColor: colors.border,
  },
  rowLabel: {
    justifyContent: 'center',
    paddingHorizontal: spacing.md,
    borderBottomWidth: 1,
    borderBottomColor: colors.border,
    minHeight: sizes.touch,
  },
  scroll: {
    flex: 1,
  },
  headerRow: {
    flexDirection: 'row',
    borderBottomWidth: 1,
    borderBottomColor: colors.border,
  },
  dayHead: {
    justifyContent: 'center',
    paddingHorizontal: spacing.sm,
    borderRightWidth: 1,
    borderRightColor: colors.border,
  },
  weekend: {
    backgroundColor: colors.surfaceMuted,
  },
  today: {
    backgroundColor: colors.primaryTint,
  },
  row: {
    position: 'relative',
    borderBottomWidth: 1,
    borderBottomColor: colors.border,
  },
  gridCell: {
    position: 'absolute',
    top: 0,
    bottom: 0,
    borderRightWidth: 1,
    borderRightColor: colors.border,
  },
  bar: {
    position: 'absolute',
    height: LANE_H - ROW_PAD * 2,
    borderRadius: radii.sm,
    borderWidth: 1,
    paddingHorizontal: spacing.xs,
    paddingVertical: spacing.xxs,
    overflow: 'hidden',
    justifyContent: 'center',
  },
  barPlanned: {
    backgroundColor: colors.primaryTint,
    borderColor: colors.primary,
  },
  barOut: {
    backgroundColor: colors.warningTint,
    borderColor: colors.warning,
  },
  barDone: {
    backgroundColor: colors.surfaceMuted,
    borderColor: colors.borderStrong,
  },
  barDanger: {
    backgroundColor: colors.dangerTint,
    borderColor: colors.danger,
    borderWidth: 2,
  },
  nowLine: {
    position: 'absolute',
    top: HEADER_H,
    bottom: 0,
    width: 2,
    backgroundColor: colors.accent,
  },
  pressed: {
    opacity: 0.8,
  },
  focused: {
    outlineColor: colors.focus,
    outlineStyle: 'solid',
    outlineWidth: sizes.focusRing,
    outlineOffset: 1,
  },
});
