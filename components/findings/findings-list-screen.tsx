import { useRouter } from 'expo-router';
import { useCallback, useMemo, useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { Button } from '@/components/ui/button';
import { PageTitle } from '@/components/ui/page-title';
import { ListTitle, PagedList } from '@/components/ui/paged-list';
import { Select } from '@/components/ui/select';
import { EmptyState } from '@/components/ui/states';
import { Text } from '@/components/ui/text';
import { TextLink } from '@/components/ui/text-link';
import { spacing } from '@/components/theme/tokens';
import { useAssetQuery } from '@/hooks/queries/assets';
import { useFindingListQuery, useProgramPeopleQuery, type FindingFilters as Filters, type FindingMine } from '@/hooks/queries/findings';
import { useBreakpoints } from '@/hooks/use-breakpoints';
import { useSession } from '@/hooks/use-session';
import { FINDING_MEMBER_ROLES } from '@/shared/domain/finding-workflow';
import { SYSTEMS, type System } from '@/shared/schemas/assets';
import {
  FINDING_SEVERITIES,
  FINDING_SEVERITY_LABELS,
  FINDING_STATUSES,
  type Finding,
  type FindingSeverity,
  type FindingStatus,
} from '@/shared/schemas/findings';
import { ANY, DEFAULT_FILTERS, FindingFilters, SORT_CHOICES, activeFilterCount, type FindingFilterValues, type SortChoice } from './finding-filters';
import { FindingCard, FindingTableHeader, FindingTableRow } from './finding-row';
import { SeverityCounts } from './severity-counts';

export type FindingListParams = {
  view?: string;
  assetId?: string;
  severity?: string;
  status?: string;
  system?: string;
  ownerId?: string;
  overdue?: string;
  sort?: string;
};

type ListView = 'all' | 'mine' | 'watching';
const VIEWS: { value: ListView; label: string }[] = [
  { value: 'all', label: 'All in program' },
  { value: 'mine', label: 'Mine' },
  { value: 'watching', label: 'Watching' },
];
const MINE: Record<ListView, FindingMine | undefined> = { all: undefined, mine: 'owner', watching: 'watching' };

const isSeverity = (v: string | undefined): v is FindingSeverity => FINDING_SEVERITIES.includes(v as FindingSeverity);
const isSystem = (v: string | undefined): v is System => SYSTEMS.includes(v as System);
const isStatus = (v: string | undefined): v is FindingStatus => FINDING_STATUSES.includes(v as FindingStatus);
const isSort = (v: string | undefined): v is SortChoice => v === 'due' || v === 'oldest' || v === 'newest';
const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

/** Filters live in the address (`/findings?view=mine&overdue=1`), so Back, e-mail links and shared links keep them. */
function valuesFrom(params: FindingListParams): FindingFilterValues & { view: ListView; severity?: FindingSeverity; assetId?: string } {
  return {
    view: params.view === 'mine' || params.view === 'watching' ? params.view : 'all',
    assetId: params.assetId && UUID.test(params.assetId) ? params.assetId : undefined,
    severity: isSeverity(params.severity) ? params.severity : undefined,
    status: params.status === ANY ? ANY : isStatus(params.status) ? params.status : DEFAULT_FILTERS.status,
    system: isSystem(params.system) ? params.system : ANY,
    ownerId: params.ownerId === 'none' || (params.ownerId && UUID.test(params.ownerId)) ? params.ownerId : ANY,
    overdue: params.overdue === '1' || params.overdue === 'true',
    sort: isSort(params.sort) ? params.sort : DEFAULT_FILTERS.sort,
  };
}

export function FindingsListScreen({ params }: { params: FindingListParams }) {
  const router = useRouter();
  const { user, currentProgramId, currentProgram } = useSession();
  const { isWide } = useBreakpoints();
  const values = valuesFrom(params);
  const [filtersOpen, setFiltersOpen] = useState(false);
  const [asOf] = useState(() => new Date());
  const asset = useAssetQuery(values.assetId ?? null);
  const people = useProgramPeopleQuery(currentProgramId);

  const sortChoice = SORT_CHOICES[values.sort];
  const filters: Filters | null = currentProgramId
    ? {
        programId: currentProgramId,
        assetId: values.assetId,
        mine: MINE[values.view],
        severity: values.severity,
        status: values.status === ANY ? undefined : values.status,
        system: values.system === ANY ? undefined : values.system,
        ownerId: values.ownerId === ANY ? undefined : values.ownerId,
        overdue: values.overdue ? true : undefined,
        sort: sortChoice.sort,
        dir: sortChoice.dir,
      }
    : null;
  const list = useFindingListQuery(filters);
  const items = useMemo(() => list.data?.pages.flatMap((page) => page.items) ?? [], [list.data]);
  const counts = list.data?.pages[0]?.counts;

  const update = useCallback(
    (change: Partial<ReturnType<typeof valuesFrom>>) => {
      const next = { ...values, ...change };
      router.setParams({
        view: next.view === 'all' ? undefined : next.view,
        assetId: next.assetId,
        severity: next.severity,
        status: next.status === DEFAULT_FILTERS.status ? undefined : next.status,
        system: next.system === ANY ? undefined : next.system,
        ownerId: next.ownerId === ANY ? undefined : next.ownerId,
        overdue: next.overdue ? '1' : undefined,
        sort: next.sort === DEFAULT_FILTERS.sort ? undefined : next.sort,
      });
    },
    [router, values],
  );

  const onSort = (sort: 'due' | 'age') => {
    if (sort === 'due') update({ sort: 'due' });
    else update({ sort: values.sort === 'newest' ? 'oldest' : 'newest' });
  };

  const canFile = Boolean(user && (FINDING_MEMBER_ROLES as readonly string[]).includes(user.role));
  const filterCount = activeFilterCount(values) + (values.severity ? 1 : 0);
  const assetTag = asset.data?.tag;
  const newHref = values.assetId ? `/findings/new?assetId=${values.assetId}` : '/findings/new';

  const header = (
    <View style={styles.header}>
      <PageTitle title={assetTag ? `Findings on ${assetTag}` : 'Findings'} />
      <ListTitle
        title={values.assetId ? `Findings on ${assetTag ?? 'this asset'}` : 'Findings'}
        subtitle={currentProgram ? `${currentProgram.code} · ${currentProgram.name}` : undefined}
        action={canFile ? <Button label="File a finding" icon="camera" compact onPress={() => router.push(newHref)} testID="finding-new" /> : null}
      />
      {values.assetId ? (
        <View style={styles.assetRow}>
          <TextLink href={`/assets/${values.assetId}`} label={`Open ${assetTag ?? 'the asset'}`} testID="findings-asset-link" />
          <Button label="Show the whole program" variant="ghost" compact onPress={() => update({ assetId: undefined })} testID="findings-clear-asset" />
        </View>
      ) : null}
      <Select
        label="Which findings"
        hideLabel
        options={VIEWS.map((view) => ({
          ...view,
          label: view.value === 'all' && values.assetId ? 'All on this asset' : view.label,
          testID: `findings-view-${view.value}`,
        }))}
        value={values.view}
        onChange={(view) => update({ view })}
        testID="findings-view"
      />
      {counts ? (
        <View style={styles.counts}>
          <Text variant="label" tone="muted">
            Still open, by severity{values.severity ? ` · showing ${FINDING_SEVERITY_LABELS[values.severity].toLowerCase()} only` : ''}
          </Text>
          <SeverityCounts counts={counts} selected={values.severity} onSelect={(severity) => update({ severity })} />
        </View>
      ) : null}
      {isWide ? (
        <FindingFilters values={values} onChange={update} people={people.data ?? []} meId={user?.id ?? null} showSort={false} />
      ) : (
        <>
          <View style={styles.toggleRow}>
            <Button
              label={filtersOpen ? 'Hide filters' : filterCount > 0 ? `Filters and sort (${filterCount} on)` : 'Filters and sort'}
              icon={filtersOpen ? 'arrow-up' : 'chevron-down'}
              variant="secondary"
              compact
              onPress={() => setFiltersOpen((open) => !open)}
              testID="finding-filters-toggle"
            />
          </View>
          {filtersOpen ? (
            <FindingFilters values={values} onChange={update} people={people.data ?? []} meId={user?.id ?? null} showSort />
          ) : null}
        </>
      )}
      {filterCount > 0 ? (
        <Button
          label="Clear filters"
          variant="ghost"
          compact
          onPress={() => update({ ...DEFAULT_FILTERS, severity: undefined, sort: values.sort })}
          testID="finding-filters-clear"
        />
      ) : null}
      {list.isSuccess && items.length > 0 ? (
        <Text variant="caption" tone="muted" testID="finding-count" aria-live="polite">
          {list.hasNextPage ? `Showing the first ${items.length} findings` : items.length === 1 ? '1 finding' : `${items.length} findings`}
          {isWide ? '' : ` · sorted by ${SORT_CHOICES[values.sort].label.toLowerCase()}`}
        </Text>
      ) : null}
    </View>
  );

  const renderItem = ({ item }: { item: Finding }) => (isWide ? <FindingTableRow finding={item} asOf={asOf} /> : <FindingCard finding={item} asOf={asOf} />);

  return (
    <PagedList
      items={items}
      query={list}
      renderItem={renderItem}
      header={header}
      noun="findings"
      programChosen={Boolean(currentProgramId)}
      empty={
        <EmptyState
          title={filterCount > 0 || values.view !== 'all' ? 'No finding matches.' : 'No findings yet.'}
          message={
            values.view === 'mine'
              ? 'Nothing is assigned to you with these filters.'
              : values.view === 'watching'
                ? 'You watch no finding with these filters. Press Watch on a finding to follow it.'
                : filterCount > 0
                  ? 'Change or clear the filters.'
                  : undefined
          }
          testID="finding-list-empty"
        />
      }
      isWide={isWide}
      tableHeader={isWide ? <FindingTableHeader sort={sortChoice} onSort={onSort} /> : null}
      tableLabel="Findings"
      testID="findings-list"
      loadMoreTestID="finding-load-more"
    />
  );
}

const styles = StyleSheet.create({
  header: {
    gap: spacing.lg,
    paddingBottom: spacing.sm,
  },
  assetRow: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    alignItems: 'center',
    gap: spacing.md,
  },
  counts: {
    gap: spacing.xs,
  },
  toggleRow: {
    flexDirection: 'row',
  },
});
