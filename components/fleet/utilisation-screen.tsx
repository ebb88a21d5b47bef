import { useMemo, useState } from 'react';
import { ScrollView, StyleSheet, View } from 'react-native';
import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { Screen } from '@/components/ui/screen';
import { Select } from '@/components/ui/select';
import { EmptyState, ErrorState, LoadingState, Notice } from '@/components/ui/states';
import { Heading, Text } from '@/components/ui/text';
import { TextField } from '@/components/ui/text-field';
import { colors, radii, sizes, spacing } from '@/components/theme/tokens';
import { useUtilisationQuery } from '@/hooks/queries/fleet';
import { useSession } from '@/hooks/use-session';
import type { Utilisation } from '@/shared/schemas/fleet';
import { FleetHeader } from './fleet-header';
import { addDays, dayKey, formatDay, parseDay, startOfDay } from './fleet-time';
import { fleetErrorMessage } from './fleet-words';

type Preset = 'last-7' | 'last-30' | 'this-month' | 'next-14' | 'custom';
const PRESET_LABELS: Record<Preset, string> = {
  'last-7': 'Last 7 days',
  'last-30': 'Last 30 days',
  'this-month': 'This month',
  'next-14': 'Next 14 days',
  custom: 'Other dates',
};

/** A period of whole local days, `to` exclusive. */
export function presetPeriod(preset: Exclude<Preset, 'custom'>, today: Date): { from: Date; to: Date } {
  const day = startOfDay(today);
  switch (preset) {
    case 'last-7':
      return { from: addDays(day, -6), to: addDays(day, 1) };
    case 'last-30':
      return { from: addDays(day, -29), to: addDays(day, 1) };
    case 'this-month':
      return { from: new Date(day.getFullYear(), day.getMonth(), 1), to: new Date(day.getFullYear(), day.getMonth() + 1, 1) };
    case 'next-14':
      return { from: day, to: addDays(day, 14) };
  }
}

export const formatPercent = (fraction: number) => `${(Math.round(fraction * 1000) / 10).toLocaleString('en-GB', { maximumFractionDigits: 1 })} %`;
/** Hours with at most one decimal, without a unit: "13.6". */
export const formatHourFigure = (hours: number) => (Math.round(hours * 10) / 10).toLocaleString('en-GB', { maximumFractionDigits: 1 });

/** The top of the plot's scale: the smallest of these that holds the highest bar, so low figures stay visible. */
function scaleTop(max: number): number {
  return [0.05, 0.1, 0.25, 0.5, 1].find((top) => max <= top) ?? 1;
}

export function UtilisationScreen() {
  const { currentProgramId } = useSession();
  const [preset, setPreset] = useState<Preset>('last-30');
  const [customFrom, setCustomFrom] = useState(() => dayKey(addDays(startOfDay(new Date()), -13)));
  const [customTo, setCustomTo] = useState(() => dayKey(new Date()));
  const [custom, setCustom] = useState<{ from: Date; to: Date } | null>(null);
  const [customError, setCustomError] = useState<string | null>(null);

  const period = useMemo(() => (preset === 'custom' ? custom : presetPeriod(preset, new Date())), [preset, custom]);
  const query = useUtilisationQuery(currentProgramId, period?.from.toISOString() ?? '', period?.to.toISOString() ?? '');

  const applyCustom = () => {
    const from = parseDay(customFrom);
    const to = parseDay(customTo);
    if (!from || !to) return setCustomError('Use dates like 2026-11-01.');
    if (to < from) return setCustomError('The last day comes on or after the first.');
    setCustomError(null);
    setCustom({ from, to: addDays(to, 1) });
  };

  return (
    <Screen testID="fleet-utilisation">
      <FleetHeader title="Utilisation" />
      <Card>
        <Select
          label="Period"
          options={(Object.keys(PRESET_LABELS) as Preset[]).map((p) => ({ value: p, label: PRESET_LABELS[p] }))}
          value={preset}
          onChange={(p) => {
            setPreset(p);
            if (p === 'custom' && !custom) applyCustom();
          }}
          testID="utilisation-period"
        />
        {preset === 'custom' ? (
          <View style={styles.custom}>
            <View style={styles.customField}>
              <TextField label="First day" value={customFrom} onChangeText={setCustomFrom} placeholder="2026-11-01" inputMode="numeric" hint="Year-month-day." testID="utilisation-from" />
            </View>
            <View style={styles.customField}>
              <TextField label="Last day" value={customTo} onChangeText={setCustomTo} placeholder="2026-11-30" inputMode="numeric" hint="Included." testID="utilisation-to" />
            </View>
            <View style={styles.apply}>
              <Button label="Show" compact onPress={applyCustom} testID="utilisation-apply" />
            </View>
          </View>
        ) : null}
        {customError ? <Notice message={customError} testID="utilisation-period-error" /> : null}
        {period ? (
          <Text variant="caption" tone="muted" testID="utilisation-period-words">
            {formatDay(period.from)} to {formatDay(addDays(period.to, -1))}, whole days in this device’s time zone.
          </Text>
        ) : null}
      </Card>

      {!currentProgramId ? (
        <Notice message="Join a program to see its fleet." />
      ) : !period ? null : query.isPending ? (
        <LoadingState label="Adding up the hours…" />
      ) : query.isError ? (
        <ErrorState message={fleetErrorMessage(query.error)} onRetry={() => void query.refetch()} retrying={query.isFetching} />
      ) : (
        <UtilisationReport data={query.data} />
      )}
    </Screen>
  );
}

function UtilisationReport({ data }: { data: Utilisation }) {
  const vehicles = [...data.vehicles].sort((a, b) => b.utilisation - a.utilisation || a.tag.localeCompare(b.tag));
  return (
    <>
      <Card testID="utilisation-total">
        <Heading level={2} variant="heading">
          Whole fleet: {formatPercent(data.total.utilisation)}
        </Heading>
        <Text>
          {formatHourFigure(data.total.assignedHours)} h assigned of {formatHourFigure(data.total.availableHours)} h available.
        </Text>
        <Text variant="caption" tone="muted" testID="utilisation-definition">
          {data.definition}
        </Text>
      </Card>
      {vehicles.length === 0 ? (
        <EmptyState title="No vehicles in this program." />
      ) : (
        <>
          <Card>
            <Heading level={2} variant="heading">
              Per stage
            </Heading>
            <BarPlot
              label="Utilisation per stage"
              bars={data.stages.map((s) => ({ key: s.stageId, name: s.stage, value: s.utilisation, caption: `${formatHourFigure(s.assignedHours)} of ${formatHourFigure(s.availableHours)} h` }))}
              testID="utilisation-plot-stages"
            />
            <FiguresTable
              caption="Per stage"
              first="Stage"
              rows={data.stages.map((s) => ({ key: s.stageId, name: s.stage, extra: String(s.vehicles), ...s }))}
              extraHeader="Vehicles"
              testID="utilisation-stage-table"
            />
          </Card>
          <Card>
            <Heading level={2} variant="heading">
              Per vehicle
            </Heading>
            <BarPlot
              label="Utilisation per vehicle"
              bars={vehicles.map((v) => ({ key: v.assetId, name: v.tag, value: v.utilisation, caption: `${formatHourFigure(v.assignedHours)} of ${formatHourFigure(v.availableHours)} h` }))}
              testID="utilisation-plot-vehicles"
            />
            <FiguresTable
              caption="Per vehicle"
              first="Vehicle"
              rows={vehicles.map((v) => ({ key: v.assetId, name: `${v.tag} (${v.stage})`, extra: String(v.assignments), ...v }))}
              extraHeader="Assignments"
              testID="utilisation-table"
            />
          </Card>
        </>
      )}
    </>
  );
}

/**
 * Horizontal bars of assigned over available hours, drawn with plain views. The scale stops at
 * the smallest round share that holds the highest bar, and says so, so that a fleet used a few
 * per cent of the time still shows its differences.
 */
function BarPlot({ label, bars, testID }: { label: string; bars: Array<{ key: string; name: string; value: number; caption: string }>; testID: string }) {
  const top = scaleTop(Math.max(0, ...bars.map((b) => b.value)));
  return (
    <View style={styles.plot} testID={testID} accessibilityLabel={`${label}; the table below gives the same figures`}>
      <Text variant="caption" tone="muted">
        Scale: 0 to {formatPercent(top)} of the hours available.
      </Text>
      {bars.map((bar) => (
        <View key={bar.key} style={styles.barRow}>
          <Text variant="caption" weight="medium" numberOfLines={1} style={styles.barName}>
            {bar.name}
          </Text>
          <View style={styles.track}>
            <View style={[styles.fill, { width: `${Math.min(100, (bar.value / top) * 100)}%` }]} />
          </View>
          <Text variant="caption" style={styles.barValue}>
            {formatPercent(bar.value)}
          </Text>
        </View>
      ))}
    </View>
  );
}

type FigureRow = { key: string; name: string; extra: string; assignedHours: number; availableHours: number; utilisation: number };

function FiguresTable({ caption, first, extraHeader, rows, testID }: { caption: string; first: string; extraHeader: string; rows: FigureRow[]; testID: string }) {
  return (
    // A sideways scroller a keyboard can reach (arrow keys scroll it once it has focus).
    <ScrollView horizontal contentContainerStyle={styles.tableScroll} role="region" aria-label={`${caption}, scrolls sideways`} tabIndex={0}>
      <View role="table" aria-label={`${caption}: hours assigned and available`} style={styles.table} testID={testID}>
        <View role="row" style={[styles.tr, styles.thead]}>
          <Cell header wide>
            {first}
          </Cell>
          <Cell header>{extraHeader}</Cell>
          <Cell header>Hours assigned</Cell>
          <Cell header>Hours available</Cell>
          <Cell header>Utilisation</Cell>
        </View>
        {rows.map((row) => (
          <View key={row.key} role="row" style={styles.tr} testID={`${testID}-row-${row.key}`}>
            <Cell wide>{row.name}</Cell>
            <Cell>{row.extra}</Cell>
            <Cell>{formatHourFigure(row.assignedHours)}</Cell>
            <Cell>{formatHourFigure(row.availableHours)}</Cell>
            <Cell>{formatPercent(row.utilisation)}</Cell>
          </View>
        ))}
      </View>
    </ScrollView>
  );
}

function Cell({ children, header = false, wide = false }: { children: string; header?: boolean; wide?: boolean }) {
  return (
    <View role={header ? 'columnheader' : 'cell'} style={[styles.td, wide && styles.tdWide]}>
      <Text variant={header ? 'label' : 'body'} tone={header ? 'muted' : 'default'} align={wide ? 'left' : 'right'}>
        {children}
      </Text>
    </View>
  );
}

const NAME_W = 120;
const VALUE_W = 64;

const styles = StyleSheet.create({
  custom: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.md,
    alignItems: 'flex-end',
  },
  customField: {
    flexGrow: 1,
    flexBasis: 150,
  },
  apply: {
    paddingBottom: spacing.xl,
  },
  plot: {
    gap: spacing.xs,
  },
  barRow: {
    flexDirection: 'row',
    alignItems: 'center',
    gap: spacing.sm,
    minHeight: spacing.xl,
  },
  barName: {
    width: NAME_W,
  },
  track: {
    flex: 1,
    height: spacing.md,
    backgroundColor: colors.surfaceMuted,
    borderRadius: radii.sm,
    overflow: 'hidden',
  },
  fill: {
    height: '100%',
    backgroundColor: colors.primary,
  },
  barValue: {
    width: VALUE_W,
    textAlign: 'right',
  },
  tableScroll: {
    flexGrow: 1,
  },
  table: {
    flexGrow: 1,
    minWidth: 620,
    borderWidth: 1,
    borderColor: colors.border,
    borderRadius: radii.md,
  },
  tr: {
    flexDirection: 'row',
    borderBottomWidth: 1,
    borderBottomColor: colors.border,
    minHeight: sizes.touch,
    alignItems: 'center',
  },
  thead: {
    backgroundColor: colors.surfaceMuted,
  },
  td: {
    width: 110,
    paddingHorizontal: spacing.sm,
    paddingVertical: spacing.xs,
  },
  tdWide: {
    flex: 1,
    minWidth: 180,
  },
});
