import { useRouter } from 'expo-router';
import { Pressable, StyleSheet, View } from 'react-native';
import { Checkbox } from '@/components/ui/checkbox';
import { Icon } from '@/components/ui/icon';
import { LinkPressable } from '@/components/ui/link-pressable';
import { ProgressBar } from '@/components/ui/progress-bar';
import { Text } from '@/components/ui/text';
import { useFocusRing } from '@/components/ui/use-focus-ring';
import { webOnly } from '@/components/ui/web-props';
import { colors, radii, sizes, spacing } from '@/components/theme/tokens';
import type { AssetSort } from '@/hooks/queries/assets';
import { ASSET_KIND_LABELS, type AssetSummary } from '@/shared/schemas/assets';
import { NotClearedBadge, StatusBadge } from './asset-status';
import { formatDate, progressFraction } from './asset-words';

export type Column = { key: string; label: string; sort?: AssetSort; flex: number };

export const COLUMNS: readonly Column[] = [
  { key: 'tag', label: 'Tag', sort: 'tag', flex: 2.2 },
  { key: 'kind', label: 'Kind', flex: 1.2 },
  { key: 'stage', label: 'Stage', sort: 'stage', flex: 1.6 },
  { key: 'status', label: 'Status', sort: 'status', flex: 1.2 },
  { key: 'location', label: 'Location', sort: 'location', flex: 1.3 },
  { key: 'checklist', label: 'Checklist', flex: 1.8 },
  { key: 'updated', label: 'Updated', sort: 'updated', flex: 1.3 },
];

export function AssetTableHeader({
  sort,
  dir,
  onSort,
  allSelected,
  someSelected,
  onSelectAll,
}: {
  sort: AssetSort;
  dir: 'asc' | 'desc';
  onSort: (sort: AssetSort) => void;
  allSelected: boolean;
  someSelected: boolean;
  onSelectAll: (selected: boolean) => void;
}) {
  return (
    <View style={[styles.row, styles.headerRow]} role="row" testID="asset-table-header">
      <View style={styles.selectCell} role="columnheader">
        <Checkbox
          label={allSelected || someSelected ? 'Clear the selection' : 'Select all shown assets'}
          hideLabel
          checked={allSelected}
          onChange={() => onSelectAll(!(allSelected || someSelected))}
          testID="asset-select-all"
        />
      </View>
      {COLUMNS.map((column) =>
        column.sort ? (
          <SortHeader key={column.key} column={column} active={sort === column.sort} dir={dir} onSort={onSort} />
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

function SortHeader({ column, active, dir, onSort }: { column: Column; active: boolean; dir: 'asc' | 'desc'; onSort: (sort: AssetSort) => void }) {
  const ring = useFocusRing();
  const state = active ? (dir === 'asc' ? 'ascending' : 'descending') : 'none';
  return (
    <View style={[styles.cell, { flex: column.flex }]} role="columnheader" {...webOnly({ 'aria-sort': state })}>
      <Pressable
        accessibilityRole="button"
        accessibilityLabel={`Sort by ${column.label.toLowerCase()}${active ? `, now ${state}` : ''}`}
        onPress={() => column.sort && onSort(column.sort)}
        onFocus={ring.onFocus}
        onBlur={ring.onBlur}
        testID={`sort-${column.key}`}
        style={({ pressed }) => [styles.sortButton, pressed && styles.pressed, ring.focused && styles.focused]}
      >
        <Text variant="label" tone={active ? 'primary' : 'muted'} weight={active ? 'semibold' : 'medium'}>
          {column.label}
        </Text>
        {active ? <Icon name={dir === 'asc' ? 'arrow-up' : 'arrow-down'} size={sizes.iconXs} color={colors.primary} /> : null}
      </Pressable>
    </View>
  );
}

/** One asset on a wide screen: a click anywhere on the row opens it; the tag is its keyboard link. */
export function AssetTableRow({
  asset,
  selected,
  onSelect,
}: {
  asset: AssetSummary;
  selected: boolean;
  onSelect: (selected: boolean) => void;
}) {
  const router = useRouter();
  const href = `/assets/${asset.id}`;
  const ring = useFocusRing();
  return (
    <Pressable
      onPress={() => router.push(href)}
      role="row"
      testID={`asset-row-${asset.tag}`}
      style={({ hovered, pressed }: { hovered?: boolean; pressed: boolean }) => [
        styles.row,
        styles.bodyRow,
        selected && styles.selectedRow,
        (hovered || pressed) && styles.hovered,
      ]}
      {...webOnly({ tabIndex: -1 })}
    >
      <View style={styles.selectCell} role="cell">
        <Checkbox label={`Select ${asset.tag}`} hideLabel checked={selected} onChange={onSelect} testID={`asset-select-${asset.tag}`} />
      </View>
      <View style={[styles.cell, { flex: COLUMNS[0].flex }]} role="cell">
        <LinkPressable
          href={href}
          onFocus={ring.onFocus}
          onBlur={ring.onBlur}
          style={[styles.tagLink, ring.focused && styles.focused]}
          testID={`asset-link-${asset.tag}`}
        >
          <Text variant="bodyStrong" tone="primary" numberOfLines={1}>
            {asset.tag}
          </Text>
        </LinkPressable>
        {asset.cleared ? null : <NotClearedBadge reason={asset.notClearedReason} testID={`asset-row-${asset.tag}-not-cleared`} />}
      </View>
      <Cell flex={COLUMNS[1].flex}>{ASSET_KIND_LABELS[asset.kind]}</Cell>
      <Cell flex={COLUMNS[2].flex}>{asset.stage}</Cell>
      <View style={[styles.cell, styles.badgeCell, { flex: COLUMNS[3].flex }]} role="cell">
        <StatusBadge status={asset.status} />
      </View>
      <Cell flex={COLUMNS[4].flex}>{asset.location || '—'}</Cell>
      <View style={[styles.cell, { flex: COLUMNS[5].flex }]} role="cell">
        <ProgressBar
          value={progressFraction(asset.checklist)}
          label={`Checklist progress of ${asset.tag}`}
          caption={asset.checklist.total === 0 ? 'No items' : `${asset.checklist.done} / ${asset.checklist.total}`}
          size="sm"
        />
      </View>
      <Cell flex={COLUMNS[6].flex}>{formatDate(asset.updatedAt)}</Cell>
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
  row: {
    flexDirection: 'row',
    alignItems: 'center',
    gap: spacing.sm,
    paddingHorizontal: spacing.sm,
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
  selectedRow: {
    backgroundColor: colors.primaryTint,
  },
  hovered: {
    backgroundColor: colors.surfaceMuted,
  },
  selectCell: {
    width: sizes.touch,
    alignItems: 'center',
  },
  cell: {
    minWidth: 0,
    gap: spacing.xxs,
  },
  badgeCell: {
    alignItems: 'flex-start',
  },
  sortButton: {
    minHeight: sizes.touch,
    flexDirection: 'row',
    alignItems: 'center',
    gap: spacing.xxs,
    alignSelf: 'flex-start',
    borderRadius: radii.sm,
    paddingHorizontal: spacing.xxs,
  },
  pressed: {
    backgroundColor: colors.border,
  },
  tagLink: {
    minHeight: sizes.touch,
    justifyContent: 'center',
    alignSelf: 'flex-start',
    borderRadius: radii.sm,
  },
  focused: {
    outlineColor: colors.focus,
    outlineStyle: 'solid',
    outlineWidth: sizes.focusRing,
  },
});
