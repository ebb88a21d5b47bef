import type { ReactElement, ReactNode } from 'react';
import { FlatList, StyleSheet, View } from 'react-native';
import { colors, sizes, spacing } from '@/components/theme/tokens';
import { errorMessage } from '@/hooks/api/api-client';
import { Button } from './button';
import { EmptyState, ErrorState, LoadingState, Notice } from './states';
import { Heading, Text } from './text';
import { webOnly } from './web-props';

/** What a paged list reads of its infinite query (TanStack's `useInfiniteQuery` result fits). */
export type PagedQuery = {
  isPending: boolean;
  isError: boolean;
  isFetching: boolean;
  error: unknown;
  refetch: () => Promise<unknown>;
  hasNextPage: boolean;
  isFetchingNextPage: boolean;
  isFetchNextPageError: boolean;
  fetchNextPage: () => Promise<unknown>;
};

type PagedListProps<T extends { id: string }> = {
  items: readonly T[];
  query: PagedQuery;
  renderItem: (info: { item: T }) => ReactElement;
  /** Title, filters and counts above the rows. */
  header: ReactElement;
  /** What the rows are called: "Loading assets…", "Join a program to see its assets." */
  noun: string;
  /** Whether the user has a program: without one the list explains that instead of loading. */
  programChosen: boolean;
  /** Shown when the query answered with no rows. */
  empty: ReactElement;
  /** A table on a wide screen (rows touch), cards on a phone (a gap between them). */
  isWide: boolean;
  /**
   * On a wide screen, the column header row of the table whose rows `renderItem` draws. The
   * list is then a `table` named `tableLabel`: rows need a table around them for screen
   * readers, and the header above the rows becomes the table's caption.
   */
  tableHeader?: ReactElement | null;
  tableLabel?: string;
  extraData?: unknown;
  testID: string;
  loadMoreTestID: string;
};

/**
 * A page-width list of rows fetched page by page: the next page loads near the end or with
 * "Load more"; before the first page it shows why there are no rows (no program, loading,
 * the error with "Try again", or `empty`).
 */
export function PagedList<T extends { id: string }>({
  items,
  query,
  renderItem,
  header,
  noun,
  programChosen,
  empty,
  isWide,
  tableHeader,
  tableLabel,
  extraData,
  testID,
  loadMoreTestID,
}: PagedListProps<T>) {
  const table = Boolean(isWide && tableHeader && items.length > 0);
  const emptyState = !programChosen ? (
    <EmptyState title="No program chosen" message={`Join a program to see its ${noun}.`} />
  ) : query.isPending ? (
    <LoadingState label={`Loading ${noun}…`} />
  ) : query.isError ? (
    <ErrorState message={errorMessage(query.error)} onRetry={() => void query.refetch()} retrying={query.isFetching} />
  ) : (
    empty
  );

  const footer = query.hasNextPage ? (
    <View style={styles.footer}>
      <Button label="Load more" variant="secondary" loading={query.isFetchingNextPage} onPress={() => void query.fetchNextPage()} testID={loadMoreTestID} />
    </View>
  ) : query.isFetchNextPageError ? (
    <Notice message={errorMessage(query.error)} />
  ) : null;

  return (
    <FlatList
      data={items}
      keyExtractor={(item) => item.id}
      renderItem={renderItem}
      extraData={extraData}
      role={table ? 'table' : undefined}
      aria-label={table ? tableLabel : undefined}
      ListHeaderComponent={
        table ? (
          <View style={styles.tableTop}>
            {/* Inside a table only rows and a caption may stand: the page's header is the caption. */}
            <View {...webOnly({ role: 'caption' })}>{header}</View>
            {tableHeader}
          </View>
        ) : (
          header
        )
      }
      ListEmptyComponent={emptyState}
      ListFooterComponent={
        table && footer ? (
          <View role="row">
            <View role="cell" style={styles.footerCell}>
              {footer}
            </View>
          </View>
        ) : (
          footer
        )
      }
      onEndReached={() => {
        if (query.hasNextPage && !query.isFetchingNextPage && !query.isFetchNextPageError) void query.fetchNextPage();
      }}
      onEndReachedThreshold={0.5}
      ItemSeparatorComponent={isWide ? undefined : Separator}
      initialNumToRender={12}
      windowSize={7}
      keyboardShouldPersistTaps="handled"
      style={styles.fill}
      contentContainerStyle={[styles.content, isWide ? styles.contentWide : styles.contentPhone]}
      testID={testID}
    />
  );
}

/** A list page's heading, a muted line under it (the program), and its main action at the right. */
export function ListTitle({ title, subtitle, action }: { title: string; subtitle?: string; action?: ReactNode }) {
  return (
    <View style={styles.titleRow}>
      <View style={styles.titleText}>
        <Heading level={1} variant="title">
          {title}
        </Heading>
        {subtitle ? <Text tone="muted">{subtitle}</Text> : null}
      </View>
      {action}
    </View>
  );
}

function Separator() {
  return <View style={styles.separator} />;
}

const styles = StyleSheet.create({
  fill: {
    flex: 1,
    backgroundColor: colors.bg,
  },
  content: {
    width: '100%',
    maxWidth: sizes.contentMaxWidth + spacing.xxl * 2,
    alignSelf: 'center',
    paddingBottom: spacing.xxxl,
  },
  contentPhone: {
    paddingHorizontal: spacing.lg,
    paddingTop: spacing.lg,
  },
  contentWide: {
    paddingHorizontal: spacing.xxl,
    paddingTop: spacing.xxl,
  },
  titleRow: {
    flexDirection: 'row',
    alignItems: 'center',
    justifyContent: 'space-between',
    gap: spacing.md,
    flexWrap: 'wrap',
  },
  titleText: {
    flex: 1,
    minWidth: 0,
    gap: spacing.xxs,
  },
  footerCell: {
    flex: 1,
  },
  tableTop: {
    gap: spacing.sm,
    paddingBottom: spacing.sm,
  },
  footer: {
    paddingVertical: spacing.lg,
    alignItems: 'center',
  },
  separator: {
    height: spacing.md,
  },
});
