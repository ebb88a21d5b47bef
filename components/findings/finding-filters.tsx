import { StyleSheet, View } from 'react-native';
import { Checkbox } from '@/components/ui/checkbox';
import { Select, type SelectOption } from '@/components/ui/select';
import { spacing } from '@/components/theme/tokens';
import type { FindingStatusFilter } from '@/hooks/queries/findings';
import { SYSTEM_LABELS, SYSTEMS, type System } from '@/shared/schemas/assets';
import { FINDING_STATUS_LABELS, FINDING_STATUSES, type Person } from '@/shared/schemas/findings';

export const ANY = 'any';

/** Owner chips shown at most (the people seen on the program's findings can be many). */
const OWNER_CHOICES = 12;

export type SortChoice = 'due' | 'oldest' | 'newest';

export type FindingFilterValues = {
  status: FindingStatusFilter | typeof ANY;
  system: System | typeof ANY;
  /** A user id, `none`, or ANY. */
  ownerId: string;
  overdue: boolean;
  sort: SortChoice;
};

export const DEFAULT_FILTERS: FindingFilterValues = { status: 'active', system: ANY, ownerId: ANY, overdue: false, sort: 'due' };

export const SORT_CHOICES: Record<SortChoice, { sort: 'due' | 'age'; dir: 'asc' | 'desc'; label: string }> = {
  due: { sort: 'due', dir: 'asc', label: 'Due date' },
  oldest: { sort: 'age', dir: 'asc', label: 'Oldest first' },
  newest: { sort: 'age', dir: 'desc', label: 'Newest first' },
};

const STATUS_OPTIONS: SelectOption<FindingStatusFilter | typeof ANY>[] = [
  { value: 'active', label: 'Still open' },
  ...FINDING_STATUSES.map((status) => ({ value: status, label: FINDING_STATUS_LABELS[status] })),
  { value: ANY, label: 'Any status' },
];

const SYSTEM_OPTIONS: SelectOption<System | typeof ANY>[] = [
  { value: ANY, label: 'Any system' },
  ...SYSTEMS.map((system) => ({ value: system, label: SYSTEM_LABELS[system] })),
];

const SORT_OPTIONS: SelectOption<SortChoice>[] = (Object.keys(SORT_CHOICES) as SortChoice[]).map((value) => ({
  value,
  label: SORT_CHOICES[value].label,
}));

/** How many filters differ from the defaults (the sort is not a filter). */
export function activeFilterCount(values: FindingFilterValues): number {
  return [values.status !== 'active', values.system !== ANY, values.ownerId !== ANY, values.overdue].filter(Boolean).length;
}

export function FindingFilters({
  values,
  onChange,
  people,
  meId,
  showSort,
}: {
  values: FindingFilterValues;
  onChange: (change: Partial<FindingFilterValues>) => void;
  people: readonly Person[];
  meId: string | null;
  showSort: boolean;
}) {
  const ownerOptions: SelectOption<string>[] = [
    { value: ANY, label: 'Anyone' },
    ...(meId ? [{ value: meId, label: 'Me' }] : []),
    { value: 'none', label: 'Nobody' },
    ...people.filter((person) => person.id !== meId).map((person) => ({ value: person.id, label: person.name })),
  ];
  return (
    <View style={styles.filters} testID="finding-filters">
      <Select label="Status" options={STATUS_OPTIONS} value={values.status} onChange={(status) => onChange({ status })} testID="finding-filter-status" />
      <Select label="System" options={SYSTEM_OPTIONS} value={values.system} onChange={(system) => onChange({ system })} testID="finding-filter-system" />
      <Select
        label="Owner"
        options={ownerOptions.filter((option, index) => index < OWNER_CHOICES || option.value === values.ownerId)}
        value={values.ownerId}
        onChange={(ownerId) => onChange({ ownerId })}
        testID="finding-filter-owner"
      />
      <Checkbox
        label="Overdue only"
        description="Past the due date and not yet verified or rejected"
        checked={values.overdue}
        onChange={(overdue) => onChange({ overdue })}
        testID="finding-filter-overdue"
      />
      {showSort ? (
        <Select label="Sort" options={SORT_OPTIONS} value={values.sort} onChange={(sort) => onChange({ sort })} testID="finding-sort" />
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  filters: {
    gap: spacing.lg,
  },
});
