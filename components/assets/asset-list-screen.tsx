import { useRouter } from 'expo-router';
import { useCallback, useMemo, useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { Button } from '@/components/ui/button';
import { PageTitle } from '@/components/ui/page-title';
import { ListTitle, PagedList } from '@/components/ui/paged-list';
import { EmptyState, Notice } from '@/components/ui/states';
import { Text } from '@/components/ui/text';
import { TextField } from '@/components/ui/text-field';
import { spacing } from '@/components/theme/tokens';
import { errorMessage } from '@/hooks/api/api-client';
import { downloadWithToken } from '@/hooks/api/download';
import { assetQueryString, useAssetListQuery, type AssetFilters as Filters, type AssetSort } from '@/hooks/queries/assets';
import { useStagesQuery } from '@/hooks/queries/stages';
import { useBreakpoints } from '@/hooks/use-breakpoints';
import { useDebouncedValue } from '@/hooks/use-debounced-value';
import { useSession } from '@/hooks/use-session';
import { API } from '@/shared/api/paths';
import { ASSET_KINDS, ASSET_SORTS, ASSET_STATUSES, type AssetKind, type AssetStatus, type AssetSummary } from '@/shared/schemas/assets';
import { ALL, AssetFilters, activeFilterCount, type FilterValues } from './asset-filters';
import { AssetCard } from './asset-card';
import { AssetTableHeader, AssetTableRow } from './asset-table';
import { can } from './permissions';

export type AssetListParams = {
  q?: string;
  stage?: string;
  status?: string;
  kind?: string;
  location?: string;
  sort?: string;
  dir?: string;
};

const isStatus = (value: string | undefined): value is AssetStatus => ASSET_STATUSES.includes(value as AssetStatus);
const isKind = (value: string | undefined): value is AssetKind => ASSET_KINDS.includes(value as AssetKind);
const isSort = (value: string | undefined): value is AssetSort => ASSET_SORTS.includes(value as AssetSort);

/** Filters live in the address (`/assets?status=down&sort=updated`), so Back and shared links keep them. */
function valuesFrom(params: AssetListParams): FilterValues {
  return {
    stage: params.stage || ALL,
    status: isStatus(params.status) ? params.status : ALL,
    kind: isKind(params.kind) ? params.kind : ALL,
    location: params.location ?? '',
    sort: isSort(params.sort) ? params.sort : 'tag',
    dir: params.dir === 'desc' ? 'desc' : 'asc',
  };
}

export function AssetListScreen({ params }: { params: AssetListParams }) {
  const router = useRouter();
  const { user, currentProgramId, currentProgram } = useSession();
  const { isWide } = useBreakpoints();
  const values = valuesFrom(params);
  const [search, setSearch] = useState(params.q ?? '');
  const q = useDebouncedValue(search.trim(), 300);
  const [filtersOpen, setFiltersOpen] = useState(false);
  const [filtersKey, setFiltersKey] = useState(0);
  const [selected, setSelected] = useState<ReadonlySet<string>>(new Set());
  const [exporting, setExporting] = useState(false);
  const [notice, setNotice] = useState<{ tone: 'success' | 'danger'; message: string } | null>(null);

  const stages = useStagesQuery(currentProgramId);
  const filters: Filters | null = currentProgramId
    ? {
        programId: currentProgramId,
        stage: values.stage === ALL ? undefined : values.stage,
        status: values.status === ALL ? undefined : (values.status as AssetStatus),
        kind: values.kind === ALL ? undefined : (values.kind as AssetKind),
        location: values.location.trim() || undefined,
        q: q || undefined,
        sort: values.sort,
        dir: values.dir,
      }
    : null;
  const list = useAssetListQuery(filters);
  const items = useMemo(() => list.data?.pages.flatMap((page) => page.items) ?? [], [list.data]);

  const update = useCallback(
    (change: Partial<FilterValues> & { q?: string }) => {
      const next = { ...values, q, ...change };
      router.setParams({
        q: next.q || undefined,
        stage: next.stage === ALL ? undefined : next.stage,
        status: next.status === ALL ? undefined : next.status,
        kind: next.kind === ALL ? undefined : next.kind,
        location: next.location.trim() || undefined,
        sort: next.sort === 'tag' ? undefined : next.sort,
        dir: next.dir === 'asc' ? undefined : next.dir,
      });
    },
    [router, values, q],
  );

  const onSort = (sort: AssetSort) => update({ sort, dir: values.sort === sort && values.dir === 'asc' ? 'desc' : 'asc' });

  const toggle = (id: string, on: boolean) =>
    setSelected((previous) => {
      const next = new Set(previous);
      if (on) next.add(id);
      else next.delete(id);
      return next;
    });

  const exportCsv = async () => {
    if (!filters) return;
    setExporting(true);
    setNotice(null);
    try {
      const { sort, dir, ...rest } = filters;
      const name = await downloadWithToken(
        `${API.assetsExport}?${assetQueryString({ ...rest, sort, dir })}`,
        `assets-${currentProgram?.code ?? 'program'}.csv`,
      );
      setNotice({ tone: 'success', message: `Saved ${name}.` });
    } catch (error) {
      setNotice({ tone: 'danger', message: errorMessage(error) });
    } finally {
      setExporting(false);
    }
  };

  const filterCount = activeFilterCount(values);
  const shownSelected = items.filter((item) => selected.has(item.id));

  const header = (
    <View style={styles.header}>
      <PageTitle title="Assets" />
      <ListTitle
        title="Assets"
        subtitle={currentProgram ? `${currentProgram.code} · ${currentProgram.name}` : undefined}
        action={can.createAsset(user?.role) ? <Button label="New asset" icon="plus" compact onPress={() => router.push('/assets/new')} testID="asset-new" /> : null}
      />
      <TextField
        label="Search"
        value={search}
        onChangeText={(text) => {
          setSearch(text);
          setSelected(new Set());
        }}
        onSubmitEditing={() => update({ q: search.trim() })}
        onBlur={() => update({ q: search.trim() })}
        placeholder="Tag, VIN or words"
        autoCapitalize="characters"
        autoCorrect={false}
        returnKeyType="search"
        inputMode="search"
        testID="asset-search"
      />
      {isWide ? (
        <AssetFilters key={filtersKey} values={values} stages={stages.data ?? []} onChange={update} inline />
      ) : (
        <View style={styles.filterToggle}>
          <Button
            label={filtersOpen ? 'Hide filters' : filterCount > 0 ? `Filters and sort (${filterCount} on)` : 'Filters and sort'}
            icon={filtersOpen ? 'arrow-up' : 'chevron-down'}
            variant="secondary"
            compact
            onPress={() => setFiltersOpen((open) => !open)}
            testID="asset-filters-toggle"
          />
        </View>
      )}
      {!isWide && filtersOpen ? (
        <AssetFilters key={filtersKey} values={values} stages={stages.data ?? []} onChange={update} showSort />
      ) : null}
      {filterCount > 0 || q ? (
        <Button
          label="Clear search and filters"
          variant="ghost"
          compact
          onPress={() => {
            setSearch('');
            setFiltersKey((key) => key + 1);
            router.setParams({ q: undefined, stage: undefined, status: undefined, kind: undefined, location: undefined });
          }}
          testID="asset-filters-clear"
        />
      ) : null}
      <View style={styles.actions}>
        <Button
          label="Export CSV"
          icon="download"
          variant="secondary"
          compact
          loading={exporting}
          onPress={() => void exportCsv()}
          accessibilityHint="Downloads the assets that match the search and filters"
          testID="asset-export"
        />
        {isWide ? (
          <Button
            label={shownSelected.length > 0 ? `Print labels (${shownSelected.length})` : 'Print labels'}
            icon="qr"
            variant="secondary"
            compact
            disabled={shownSelected.length === 0}
            accessibilityHint="Select assets in the table first"
            onPress={() => router.push(`/labels?ids=${shownSelected.map((item) => item.id).join(',')}`)}
            testID="asset-print-labels"
          />
        ) : null}
      </View>
      {notice ? <Notice tone={notice.tone} message={notice.message} testID="asset-list-notice" /> : null}
      {list.isSuccess ? (
        <Text variant="caption" tone="muted" testID="asset-count" aria-live="polite">
          {items.length === 0 ? '' : list.hasNextPage ? `Showing the first ${items.length} assets` : items.length === 1 ? '1 asset' : `${items.length} assets`}
        </Text>
      ) : null}
    </View>
  );

  const renderItem = ({ item }: { item: AssetSummary }) =>
    isWide ? (
      <AssetTableRow asset={item} selected={selected.has(item.id)} onSelect={(on) => toggle(item.id, on)} />
    ) : (
      <AssetCard asset={item} />
    );

  return (
    <PagedList
      items={items}
      query={list}
      renderItem={renderItem}
      header={header}
      noun="assets"
      programChosen={Boolean(currentProgramId)}
      empty={
        <EmptyState
          title={filterCount > 0 || q ? 'No asset matches.' : 'No assets yet.'}
          message={filterCount > 0 || q ? 'Change the search or the filters.' : can.createAsset(user?.role) ? 'Add the first one with "New asset".' : undefined}
          testID="asset-list-empty"
        />
      }
      isWide={isWide}
      tableHeader={
        isWide ? (
          <AssetTableHeader
            sort={values.sort}
            dir={values.dir}
            onSort={onSort}
            allSelected={items.length > 0 && shownSelected.length === items.length}
            someSelected={shownSelected.length > 0}
            onSelectAll={(on) => setSelected(on ? new Set(items.map((item) => item.id)) : new Set())}
          />
        ) : null
      }
      tableLabel="Assets"
      extraData={selected}
      testID="asset-list"
      loadMoreTestID="asset-load-more"
    />
  );
}

const styles = StyleSheet.create({
  header: {
    gap: spacing.lg,
    paddingBottom: spacing.sm,
  },
  filterToggle: {
    flexDirection: 'row',
  },
  actions: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.sm,
  },
});
