import { useRouter } from 'expo-router';
import { Pressable, StyleSheet, View } from 'react-native';
import { Icon } from '@/components/ui/icon';
import { LinkPressable } from '@/components/ui/link-pressable';
import { Text } from '@/components/ui/text';
import { useFocusRing } from '@/components/ui/use-focus-ring';
import { webOnly } from '@/components/ui/web-props';
import { formatDate } from '@/components/assets/asset-words';
import { colors, radii, shadows, sizes, spacing } from '@/components/theme/tokens';
import type { Finding } from '@/shared/schemas/findings';
import { FindingStatusBadge, OverdueBadge, SeverityBadge } from './finding-badges';
import { ageWords, dueWords } from './finding-words';

export type FindingSortChoice = { sort: 'due' | 'age'; dir: 'asc' | 'desc' };

/** One finding in the phone list: the whole card opens it. */
export function FindingCard({ finding, asOf }: { finding: Finding; asOf: Date }) {
  const ring = useFocusRing();
  return (
    <LinkPressable
      href={`/findings/${finding.id}`}
      testID={`finding-row-${finding.id}`}
      onFocus={ring.onFocus}
      onBlur={ring.onBlur}
      style={({ pressed }) => [
        styles.card,
        finding.blocksDriving && styles.cardAlert,
        pressed && styles.pressed,
        ring.focused && styles.focused,
      ]}
    >
      <View style={styles.cardTop}>
        <Text variant="bodyStrong" style={styles.cardTitle} numberOfLines={2}>
          {finding.title}
        </Text>
        <Icon name="chevron-right" size={sizes.iconSm} color={colors.textMuted} />
      </View>
      <View style={styles.badges}>
        <SeverityBadge severity={finding.severity} />
        <FindingStatusBadge status={finding.status} />
        {finding.overdue ? <OverdueBadge /> : null}
      </View>
      <Text variant="caption" tone="muted">
        {[finding.assetTag, finding.owner?.name ?? 'No owner', dueWords(finding.dueDate, finding.overdue), ageWords(finding.createdAt, asOf)]
          .filter(Boolean)
          .join(' · ')}
      </Text>
    </LinkPressable>
  );
}

type Column = { key: string; label: string; flex: number; sort?: 'due' | 'age' };

const COLUMNS: readonly Column[] = [
  { key: 'title', label: 'Title', flex: 3.2 },
  { key: 'asset', label: 'Asset', flex: 1.5 },
  { key: 'severity', label: 'Severity', flex: 1.2 },
  { key: 'status', label: 'Status', flex: 1.6 },
  { key: 'owner', label: 'Owner', flex: 1.5 },
  { key: 'due', label: 'Due', flex: 1.3, sort: 'due' },
  { key: 'age', label: 'Age', flex: 1, sort: 'age' },
];

export function FindingTableHeader({ sort, onSort }: { sort: FindingSortChoice; onSort: (sort: 'due' | 'age') => void }) {
  return (
    <View style={[styles.row, styles.headerRow]} role="row" testID="finding-table-header">
      {COLUMNS.map((column) =>
        column.sort ? (
          <SortHeader key={column.key} column={column} active={sort.sort === column.sort} dir={sort.dir} onSort={onSort} />
        ) : (
          <View key={column.key} style={[styles.cell, { flex: column.flex }]} role="columnheader">
            <Text variant="label" tone="muted">
              {column.label}
            </Text>
          </View>
        ),
      )}
    </View>
  );
}

function SortHeader({ column, active, dir, onSort }: { column: Column; active: boolean; dir: 'asc' | 'desc'; onSort: (sort: 'due' | 'age') => void }) {
  const ring = useFocusRing();
  // Age ascending = youngest first: the list sorts by filing time, so the arrow follows the words.
  const ascending = column.sort === 'age' ? dir === 'desc' : dir === 'asc';
  const state = active ? (ascending ? 'ascending' : 'descending') : 'none';
  return (
    <View style={[styles.cell, { flex: column.flex }]} role="columnheader" {...webOnly({ 'aria-sort': state })}>
      <Pressable
        accessibilityRole="button"
        accessibilityLabel={`Sort by ${column.label.toLowerCase()}${active ? `, now ${state}` : ''}`}
        onPress={() => column.sort && onSort(column.sort)}
        onFocus={ring.onFocus}
        onBlur={ring.onBlur}
        testID={`finding-sort-${column.key}`}
        style={({ pressed }) => [styles.sortButton, pressed && styles.pressedCell, ring.focused && styles.focused]}
      >
        <Text variant="label" tone={active ? 'primary' : 'muted'} weight={active ? 'semibold' : 'medium'}>
          {column.label}
        </Text>
        {active ? <Icon name={ascending ? 'arrow-up' : 'arrow-down'} size={sizes.iconXs} color={colors.primary} /> : null}
      </Pressable>
    </View>
  );
}

/** One finding on a wide screen: a click anywhere opens it; the title is its keyboard link. */
export function FindingTableRow({ finding, asOf }: { finding: Finding; asOf: Date }) {
  const router = useRouter();
  const ring = useFocusRing();
  const href = `/findings/${finding.id}`;
  return (
    <Pressable
      onPress={() => router.push(href)}
      role="row"
      testID={`finding-row-${finding.id}`}
      style={({ hovered, pressed }: { hovered?: boolean; pressed: boolean }) => [
        styles.row,
        styles.bodyRow,
        finding.blocksDriving && styles.rowAlert,
        (hovered || pressed) && styles.hovered,
      ]}
      {...webOnly({ tabIndex: -1 })}
    >
      <View style={[styles.cell, { flex: COLUMNS[0].flex }]} role="cell">
        <LinkPressable href={href} onFocus={ring.onFocus} onBlur={ring.onBlur} style={[styles.titleLink, ring.focused && styles.focused]}>
          <Text variant="bodyStrong" tone="primary" numberOfLines={2}>
            {finding.title}
          </Text>
        </LinkPressable>
      </View>
      <Cell flex={COLUMNS[1].flex}>{finding.assetTag ?? '—'}</Cell>
      <View style={[styles.cell, { flex: COLUMNS[2].flex }]} role="cell">
        <SeverityBadge severity={finding.severity} />
      </View>
      <View style={[styles.cell, { flex: COLUMNS[3].flex }]} role="cell">
        <FindingStatusBadge status={finding.status} />
      </View>
      <Cell flex={COLUMNS[4].flex}>{finding.owner?.name ?? 'No owner'}</Cell>
      <View style={[styles.cell, { flex: COLUMNS[5].flex }]} role="cell">
        <Text tone={finding.overdue ? 'danger' : 'default'} weight={finding.overdue ? 'semibold' : undefined}>
          {finding.dueDate ? formatDate(finding.dueDate) : '—'}
        </Text>
        {finding.overdue ? (
          <Text variant="caption" tone="danger">
            Overdue
          </Text>
        ) : null}
      </View>
      <Cell flex={COLUMNS[6].flex}>{ageWords(finding.createdAt, asOf)}</Cell>
    </Pressable>
  );
}

function Cell({ flex, children }: { flex: number; children: string }) {
  return (
    <View style={[styles.cell, { flex }]} role="cell">
      <Text numberOfLines={2}>{children}</Text>
    </View>
  );
}

const styles = StyleSheet.create({
  card: {
    backgroundColor: colors.surface,
    borderRadius: radii.lg,
    borderWidth: 1,
    borderColor: colors.border,
    padding: spacing.lg,
    gap: spacing.sm,
    ...shadows.card,
  },
  cardAlert: {
    borderColor: colors.danger,
    borderLeftWidth: spacing.xs,
  },
  cardTop: {
    flexDirection: 'row',
    alignItems: 'flex-start',
    gap: spacing.sm,
  },
  cardTitle: {
    flex: 1,
    minWidth: 0,
  },
  badges: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.xs,
  },
  pressed: {
    backgroundColor: colors.surfaceMuted,
  },
  focused: {
    outlineColor: colors.focus,
    outlineStyle: 'solid',
    outlineWidth: sizes.focusRing,
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
    paddingVertical: spacing.xs,
  },
  rowAlert: {
    borderLeftWidth: spacing.xs,
    borderLeftColor: colors.danger,
  },
  hovered: {
    backgroundColor: colors.surfaceMuted,
  },
  cell: {
    minWidth: 0,
    gap: spacing.xxs,
    alignItems: 'flex-start',
  },
  sortButton: {
    minHeight: sizes.touch,
    flexDirection: 'row',
    alignItems: 'center',
    gap: spacing.xxs,
    borderRadius: radii.sm,
    paddingHorizontal: spacing.xxs,
  },
  pressedCell: {
    backgroundColor: colors.border,
  },
  titleLink: {
    minHeight: sizes.touch,
    justifyContent: 'center',
    borderRadius: radii.sm,
  },
});
