import { StyleSheet, View } from 'react-native';
import Svg, { Line, Polyline, Text as SvgText } from 'react-native-svg';
import { Text } from '@/components/ui/text';
import { colors, readiness as readinessColors, spacing } from '@/components/theme/tokens';
import type { StageTrend } from '@/shared/schemas/readiness';
import { formatScore } from './readiness-words';

const HEIGHT = 220;
const PAD = { left: 40, right: 40, top: 16, bottom: 28 };

function dayNumber(date: string): number {
  return Math.round(Date.parse(`${date.slice(0, 10)}T00:00:00Z`) / 86_400_000);
}

/**
 * Mean score (left axis, 0-100) and open-findings load (right axis) per day, with the fitted
 * least-squares line over the last 14 days of load. The table below it carries the same figures
 * for screen readers.
 */
export function TrendChart({ trend, width }: { trend: StageTrend; width: number }) {
  const series = trend.series;
  const chartWidth = Math.max(280, width);
  if (series.length === 0) return <Text tone="muted">No daily snapshots yet.</Text>;

  const days = series.map((p) => dayNumber(p.date));
  const fitLine = trend.fit?.line ?? [];
  const allDays = [...days, ...fitLine.map((p) => dayNumber(p.date))];
  const minDay = Math.min(...allDays);
  const maxDay = Math.max(...allDays, minDay + 1);
  const maxLoad = Math.max(1, ...series.map((p) => p.load), ...fitLine.map((p) => p.load), trend.forecast.targetLoad ?? 0);
  const innerW = chartWidth - PAD.left - PAD.right;
  const innerH = HEIGHT - PAD.top - PAD.bottom;
  const x = (day: number) => PAD.left + ((day - minDay) / (maxDay - minDay)) * innerW;
  const yScore = (score: number) => PAD.top + (1 - score / 100) * innerH;
  const yLoad = (load: number) => PAD.top + (1 - Math.max(0, load) / maxLoad) * innerH;

  const scorePoints = series
    .filter((p) => p.meanScore !== null)
    .map((p) => `${x(dayNumber(p.date))},${yScore(p.meanScore ?? 0)}`)
    .join(' ');
  const loadPoints = series.map((p) => `${x(dayNumber(p.date))},${yLoad(p.load)}`).join(' ');
  const fitPoints = fitLine.map((p) => `${x(dayNumber(p.date))},${yLoad(p.load)}`).join(' ');
  const goY = yScore(trend.gate.goThreshold);

  return (
    <View style={styles.wrap}>
      <View aria-hidden accessibilityElementsHidden importantForAccessibility="no-hide-descendants">
        <Svg width={chartWidth} height={HEIGHT} testID="trend-chart">
          <Line x1={PAD.left} y1={PAD.top + innerH} x2={PAD.left + innerW} y2={PAD.top + innerH} stroke={colors.borderStrong} strokeWidth={1} />
          <Line x1={PAD.left} y1={goY} x2={PAD.left + innerW} y2={goY} stroke={readinessColors.go} strokeWidth={1} strokeDasharray="2 4" />
          <SvgText x={PAD.left - 6} y={PAD.top + 4} fontSize={11} fill={colors.textMuted} textAnchor="end">
            100
          </SvgText>
          <SvgText x={PAD.left - 6} y={PAD.top + innerH} fontSize={11} fill={colors.textMuted} textAnchor="end">
            0
          </SvgText>
          <SvgText x={PAD.left + innerW + 6} y={PAD.top + 4} fontSize={11} fill={colors.textMuted}>
            {formatScore(maxLoad)}
          </SvgText>
          <SvgText x={PAD.left + innerW + 6} y={PAD.top + innerH} fontSize={11} fill={colors.textMuted}>
            0
          </SvgText>
          <SvgText x={PAD.left} y={HEIGHT - 8} fontSize={11} fill={colors.textMuted}>
            {series[0].date}
          </SvgText>
          <SvgText x={PAD.left + innerW} y={HEIGHT - 8} fontSize={11} fill={colors.textMuted} textAnchor="end">
            {series[series.length - 1].date}
          </SvgText>
          {scorePoints ? <Polyline points={scorePoints} fill="none" stroke={colors.primary} strokeWidth={2.5} /> : null}
          <Polyline points={loadPoints} fill="none" stroke={readinessColors.conditional} strokeWidth={2} />
          {fitPoints ? <Polyline points={fitPoints} fill="none" stroke={readinessColors.noGo} strokeWidth={2} strokeDasharray="6 4" /> : null}
        </Svg>
      </View>
      <View style={styles.legend}>
        <LegendItem color={colors.primary} label="Mean score (left axis, 0 to 100)" />
        <LegendItem color={readinessColors.conditional} label="Open-findings load (right axis)" />
        {fitPoints ? <LegendItem color={readinessColors.noGo} label="Least-squares line, last 14 days of load" dashed /> : null}
        <LegendItem color={readinessColors.go} label={`Go threshold (${trend.gate.goThreshold})`} dashed />
      </View>
    </View>
  );
}

function LegendItem({ color, label, dashed = false }: { color: string; label: string; dashed?: boolean }) {
  return (
    <View style={styles.legendItem}>
      <View style={[styles.swatch, { borderColor: color, borderStyle: dashed ? 'dashed' : 'solid' }]} />
      <Text variant="caption">{label}</Text>
    </View>
  );
}

/** The chart's figures as a table (for screen readers and for reading exact values). */
export function TrendTable({ trend }: { trend: StageTrend }) {
  return (
    <View style={styles.table} accessibilityLabel="Daily figures" testID="trend-table" role="table">
      <View style={styles.tr} role="row">
        {['Date', 'Mean score', 'Load', 'Go / cond. / no-go'].map((h) => (
          <Text key={h} variant="label" style={styles.td} role="columnheader">
            {h}
          </Text>
        ))}
      </View>
      {[...trend.series].reverse().map((p) => (
        <View key={p.date} style={styles.tr} role="row">
          <Text variant="caption" style={styles.td} role="cell">
            {p.date}
          </Text>
          <Text variant="caption" style={styles.td} role="cell">
            {formatScore(p.meanScore)}
          </Text>
          <Text variant="caption" style={styles.td} role="cell">
            {formatScore(p.load)}
          </Text>
          <Text variant="caption" style={styles.td} role="cell">
            {`${p.counts.go} / ${p.counts.conditional} / ${p.counts.noGo}`}
          </Text>
        </View>
      ))}
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: spacing.sm },
  legend: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.md },
  legendItem: { flexDirection: 'row', alignItems: 'center', gap: spacing.xs },
  swatch: { width: 20, height: 0, borderTopWidth: 3 },
  table: { borderTopWidth: 1, borderColor: colors.border },
  tr: { flexDirection: 'row', borderBottomWidth: 1, borderColor: colors.border, paddingVertical: spacing.xxs },
  td: { flex: 1 },
});
