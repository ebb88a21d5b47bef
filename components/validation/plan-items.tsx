import { useRouter } from 'expo-router';
import { Pressable, StyleSheet, View } from 'react-native';
import { Badge } from '@/components/ui/chip';
import { LinkPressable } from '@/components/ui/link-pressable';
import { Text } from '@/components/ui/text';
import { useFocusRing } from '@/components/ui/use-focus-ring';
import { webOnly } from '@/components/ui/web-props';
import { colors, radii, shadows, sizes, spacing } from '@/components/theme/tokens';
import type { TestStatus, ValidationTest } from '@/shared/schemas/validation';
import { formatNumber, formatPercent, sampleSizeSentence, TEST_STATUS_LABELS, TEST_STATUS_TONES } from './validation-words';

export function TestStatusBadge({ status, testID }: { status: TestStatus; testID?: string }) {
  return <Badge label={TEST_STATUS_LABELS[status]} tone={TEST_STATUS_TONES[status]} testID={testID} />;
}

const testHref = (test: ValidationTest) => `/validation/tests/${test.id}`;

function targets(test: ValidationTest) {
  return `R ${formatPercent(test.reliability)} · C ${formatPercent(test.confidence)}`;
}

function weibull(test: ValidationTest) {
  return test.testToLife !== null && test.shape !== null ? `L ${formatNumber(test.testToLife)} · b ${formatNumber(test.shape)}` : null;
}

/** "3 allocated · 1 passed" */
function counts(test: ValidationTest) {
  return `${test.allocations.length} allocated · ${test.passedSamples} passed`;
}

/** One test on a phone: the whole card opens it. */
export function TestCard({ test }: { test: ValidationTest }) {
  const ring = useFocusRing();
  const tid = `vtest-${test.id}`;
  const l = weibull(test);
  return (
    <LinkPressable
      href={testHref(test)}
      testID={tid}
      onFocus={ring.onFocus}
      onBlur={ring.onBlur}
      style={({ pressed }) => [styles.card, test.status === 'failed' && styles.cardFailed, pressed && styles.pressed, ring.focused && styles.focused]}
    >
      <View style={styles.cardTop}>
        <View style={styles.grow}>
          <Text variant="bodyStrong">{test.name}</Text>
          {test.procedureRef ? (
            <Text variant="caption" tone="muted">
              {test.procedureRef}
            </Text>
          ) : null}
        </View>
        <TestStatusBadge status={test.status} testID={`${tid}-status`} />
      </View>
      {test.verifies ? (
        <Text variant="caption" numberOfLines={3}>
          {test.verifies}
        </Text>
      ) : null}
      <Text variant="label">
        {targets(test)}
        {l ? ` · ${l}` : ''}
      </Text>
      <Text variant="bodyStrong" testID={`${tid}-n`}>
        {sampleSizeSentence(test.requiredSamples, test.requiredSamplesExact)}
      </Text>
      <Text variant="caption" tone="muted">
        {counts(test)}
      </Text>
    </LinkPressable>
  );
}

type Column = { key: string; label: string; flex: number };
export const PLAN_COLUMNS: readonly Column[] = [
  { key: 'test', label: 'Test', flex: 3.2 },
  { key: 'targets', label: 'R and C', flex: 1.2 },
  { key: 'weibull', label: 'L and b', flex: 1 },
  { key: 'samples', label: 'Samples needed', flex: 1.7 },
  { key: 'allocated', label: 'Allocated / passed', flex: 1.3 },
  { key: 'status', label: 'Status', flex: 1 },
];

export function PlanTableHeader() {
  return (
    <View style={[styles.row, styles.headerRow]} role="row">
      {PLAN_COLUMNS.map((column) => (
        <View key={column.key} style={[styles.cell, { flex: column.flex }]} role="columnheader">
          <Text variant="label" tone="muted">
            {column.label}
          </Text>
        </View>
      ))}
    </View>
  );
}

/** One test on a wide screen: a click anywhere opens it; the name is its keyboard link. */
export function PlanTableRow({ test }: { test: ValidationTest }) {
  const router = useRouter();
  const ring = useFocusRing();
  const tid = `vtest-${test.id}`;
  const [c0, c1, c2, c3, c4, c5] = PLAN_COLUMNS;
  return (
    <Pressable
      onPress={() => router.push(testHref(test))}
      role="row"
      testID={tid}
      style={({ hovered, pressed }: { hovered?: boolean; pressed: boolean }) => [styles.row, styles.bodyRow, (hovered || pressed) && styles.hovered]}
      {...webOnly({ tabIndex: -1 })}
    >
      <View style={[styles.cell, { flex: c0.flex }]} role="cell">
        <LinkPressable href={testHref(test)} onFocus={ring.onFocus} onBlur={ring.onBlur} style={[styles.nameLink, ring.focused && styles.focused]}>
          <Text variant="bodyStrong" tone="primary">
            {test.name}
          </Text>
        </LinkPressable>
        {test.procedureRef ? (
          <Text variant="caption" tone="muted">
            {test.procedureRef}
          </Text>
        ) : null}
        {test.verifies ? (
          <Text variant="caption" numberOfLines={2}>
            {test.verifies}
          </Text>
        ) : null}
      </View>
      <View style={[styles.cell, { flex: c1.flex }]} role="cell">
        <Text variant="caption">R {formatPercent(test.reliability)}</Text>
        <Text variant="caption">C {formatPercent(test.confidence)}</Text>
      </View>
      <View style={[styles.cell, { flex: c2.flex }]} role="cell">
        {test.testToLife !== null && test.shape !== null ? (
          <>
            <Text variant="caption">L {formatNumber(test.testToLife)}</Text>
            <Text variant="caption">b {formatNumber(test.shape)}</Text>
          </>
        ) : (
          <Text variant="caption" tone="muted" accessibilityLabel="Not time-based">
            None
          </Text>
        )}
      </View>
      <View style={[styles.cell, { flex: c3.flex }]} role="cell">
        <Text variant="bodyStrong" testID={`${tid}-n`}>
          n = {test.requiredSamples}
        </Text>
        {Math.abs(test.requiredSamplesExact - test.requiredSamples) > 1e-9 ? (
          <Text variant="caption" tone="muted">
            ({formatNumber(test.requiredSamplesExact)} before rounding up)
          </Text>
        ) : null}
      </View>
      <View style={[styles.cell, { flex: c4.flex }]} role="cell">
        <Text>
          {test.allocations.length} / {test.passedSamples}
        </Text>
      </View>
      <View style={[styles.cell, styles.badgeCell, { flex: c5.flex }]} role="cell">
        <TestStatusBadge status={test.status} testID={`${tid}-status`} />
      </View>
    </Pressable>
  );
}

const styles = StyleSheet.create({
  card: {
    backgroundColor: colors.surface,
    borderRadius: radii.lg,
    borderWidth: 1,
    borderColor: colors.border,
    padding: spacing.md,
    gap: spacing.xs,
    ...shadows.card,
  },
  cardFailed: {
    borderColor: colors.danger,
  },
  cardTop: {
    flexDirection: 'row',
    alignItems: 'flex-start',
    gap: spacing.sm,
  },
  grow: {
    flex: 1,
    minWidth: 0,
  },
  pressed: {
    backgroundColor: colors.surfaceMuted,
  },
  focused: {
    outlineColor: colors.focus,
    outlineStyle: 'solid',
    outlineWidth: sizes.focusRing,
    outlineOffset: 2,
  },
  row: {
    flexDirection: 'row',
    alignItems: 'center',
    gap: spacing.sm,
    paddingHorizontal: spacing.md,
    borderBottomWidth: 1,
    borderBottomColor: colors.border,
  },
  headerRow: {
    minHeight: sizes.touch,
    backgroundColor: colors.surfaceMuted,
    borderTopLeftRadius: radii.md,
    borderTopRightRadius: radii.md,
  },
  bodyRow: {
    minHeight: sizes.control + spacing.sm,
    backgroundColor: colors.surface,
    paddingVertical: spacing.sm,
  },
  hovered: {
    backgroundColor: colors.surfaceMuted,
  },
  cell: {
    minWidth: 0,
    gap: spacing.xxs,
  },
  badgeCell: {
    alignItems: 'flex-start',
  },
  nameLink: {
    minHeight: sizes.touch,
    justifyContent: 'center',
    alignSelf: 'flex-start',
    borderRadius: radii.sm,
  },
});
