import { useState, type ReactNode } from 'react';
import { StyleSheet, View } from 'react-native';
import { Button } from '@/components/ui/button';
import { Select, type SelectOption } from '@/components/ui/select';
import { Text } from '@/components/ui/text';
import { TextField } from '@/components/ui/text-field';
import { spacing } from '@/components/theme/tokens';
import type { AssetSort } from '@/hooks/queries/assets';
import { ASSET_KINDS, ASSET_KIND_LABELS, ASSET_STATUSES, ASSET_STATUS_LABELS, type Stage } from '@/shared/schemas/assets';

export const ALL = 'all';

export type FilterValues = {
  stage: string;
  status: string;
  kind: string;
  location: string;
  sort: AssetSort;
  dir: 'asc' | 'desc';
};

export const SORT_LABELS: Record<AssetSort, string> = {
  tag: 'Tag',
  updated: 'Last updated',
  stage: 'Stage',
  status: 'Status',
  location: 'Location',
};

const statusOptions: SelectOption<string>[] = [
  { value: ALL, label: 'Any status' },
  ...ASSET_STATUSES.map((value) => ({ value, label: ASSET_STATUS_LABELS[value] })),
];
const kindOptions: SelectOption<string>[] = [
  { value: ALL, label: 'Any kind' },
  ...ASSET_KINDS.map((value) => ({ value, label: ASSET_KIND_LABELS[value] })),
];
const sortOptions: SelectOption<AssetSort>[] = (Object.keys(SORT_LABELS) as AssetSort[]).map((value) => ({
  value,
  label: SORT_LABELS[value],
}));

export function activeFilterCount(values: FilterValues): number {
  return [values.stage, values.status, values.kind].filter((value) => value !== ALL).length + (values.location.trim() ? 1 : 0);
}

/** Stage, status, kind and location filters, plus the sort on a phone (a wide table sorts by its headers). */
export function AssetFilters({
  values,
  stages,
  onChange,
  showSort = false,
  inline = false,
}: {
  values: FilterValues;
  stages: readonly Stage[];
  onChange: (change: Partial<FilterValues>) => void;
  /** A phone has no sortable headers: it sorts here. */
  showSort?: boolean;
  /** Wide screens: each label beside its chips, to leave room for the table. */
  inline?: boolean;
}) {
  const [location, setLocation] = useState(values.location);
  const stageOptions: SelectOption<string>[] = [
    { value: ALL, label: 'Any stage' },
    ...stages.map((stage) => ({ value: stage.id, label: stage.retired ? `${stage.name} (retired)` : stage.name, testID: `filter-stage-${stage.name}` })),
  ];
  const locationField = (
    <TextField
      label="Location"
      hint={inline ? undefined : 'The exact place, for example Bay 4. Leave empty for any.'}
      placeholder="Exact place, for example Bay 4"
      value={location}
      onChangeText={setLocation}
      onBlur={() => onChange({ location })}
      onSubmitEditing={() => onChange({ location })}
      returnKeyType="search"
      testID="filter-location"
    />
  );
  const stage = <Select label="Stage" hideLabel={inline} options={stageOptions} value={values.stage} onChange={(value) => onChange({ stage: value })} testID="filter-stage" />;
  const status = <Select label="Status" hideLabel={inline} options={statusOptions} value={values.status} onChange={(value) => onChange({ status: value })} testID="filter-status" />;
  const kind = <Select label="Kind" hideLabel={inline} options={kindOptions} value={values.kind} onChange={(value) => onChange({ kind: value })} testID="filter-kind" />;

  if (inline) {
    return (
      <View style={styles.inlineBox} testID="asset-filters">
        <InlineRow label="Stage">{stage}</InlineRow>
        <InlineRow label="Status">{status}</InlineRow>
        <InlineRow label="Kind">
          <View style={styles.kindRow}>
            <View style={styles.kindChips}>{kind}</View>
            <View style={styles.location}>{locationField}</View>
          </View>
        </InlineRow>
      </View>
    );
  }

  return (
    <View style={styles.box} testID="asset-filters">
      {stage}
      {status}
      {kind}
      {locationField}
      {showSort ? (
        <View style={styles.sort}>
          <Select label="Sort by" options={sortOptions} value={values.sort} onChange={(sort) => onChange({ sort })} testID="sort-by" />
          <Button
            label={values.dir === 'asc' ? 'Ascending' : 'Descending'}
            icon={values.dir === 'asc' ? 'arrow-up' : 'arrow-down'}
            variant="secondary"
            compact
            accessibilityLabel={`Sort order: ${values.dir === 'asc' ? 'ascending' : 'descending'}. Change it`}
            onPress={() => onChange({ dir: values.dir === 'asc' ? 'desc' : 'asc' })}
            testID="sort-dir"
          />
        </View>
      ) : null}
    </View>
  );
}

/** A wide screen's filter row: the label beside its chips (the Select keeps its own label for screen readers). */
function InlineRow({ label, children }: { label: string; children: ReactNode }) {
  return (
    <View style={styles.inlineRow}>
      <Text variant="label" tone="muted" style={styles.inlineLabel} aria-hidden>
        {label}
      </Text>
      <View style={styles.inlineBody}>{children}</View>
    </View>
  );
}

const styles = StyleSheet.create({
  box: {
    gap: spacing.lg,
  },
  sort: {
    gap: spacing.sm,
  },
  inlineBox: {
    gap: spacing.sm,
  },
  inlineRow: {
    flexDirection: 'row',
    alignItems: 'center',
    gap: spacing.md,
  },
  inlineLabel: {
    width: 56,
  },
  inlineBody: {
    flex: 1,
    minWidth: 0,
  },
  kindRow: {
    flexDirection: 'row',
    alignItems: 'flex-start',
    gap: spacing.lg,
    flexWrap: 'wrap',
  },
  kindChips: {
    flexShrink: 0,
  },
  location: {
    flex: 1,
    minWidth: 220,
  },
});
