import { useMemo, useState } from 'react';
import { Platform, ScrollView, StyleSheet, View, type ViewStyle } from 'react-native';
import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { Chip } from '@/components/ui/chip';
import { LinkPressable } from '@/components/ui/link-pressable';
import { Screen } from '@/components/ui/screen';
import { Select } from '@/components/ui/select';
import { EmptyState, ErrorState, LoadingState } from '@/components/ui/states';
import { Text } from '@/components/ui/text';
import { colors, radii, sizes, spacing } from '@/components/theme/tokens';
import { errorMessage } from '@/hooks/api/api-client';
import { useSoftwareMatrixQuery, type MatrixFilters } from '@/hooks/queries/software';
import { useStagesQuery } from '@/hooks/queries/stages';
import { useBreakpoints } from '@/hooks/use-breakpoints';
import { useSession } from '@/hooks/use-session';
import {
  CONFORMANCE_STATUSES,
  CONFORMANCE_STATUS_LABELS,
  type ConformanceStatus,
  type MatrixRow,
  type StatusCounts,
} from '@/shared/schemas/software';
import { SoftwareHeader } from './software-header';
import { cellDescription } from './software-words';
import { StatusTag, VersionCell } from './status-tag';

const ALL = 'all';
type Ecu = { id: string; code: string; name: string };

/** Assets down, ECUs across: each cell the installed version with its status in words. */
export function SoftwareMatrixScreen() {
  const { currentProgramId } = useSession();
  const { isWide } = useBreakpoints();
  const [stageId, setStageId] = useState<string>(ALL);
  const [ecuId, setEcuId] = useState<string>(ALL);
  const [status, setStatus] = useState<ConformanceStatus | null>(null);
  const stages = useStagesQuery(currentProgramId);

  const filters: MatrixFilters | null = currentProgramId
    ? {
        programId: currentProgramId,
        stageId: stageId === ALL ? undefined : stageId,
        ecuId: ecuId === ALL ? undefined : ecuId,
        status: status ?? undefined,
      }
    : null;
  const matrix = useSoftwareMatrixQuery(filters);
  const first = matrix.data?.pages[0];
  const rows = useMemo(() => matrix.data?.pages.flatMap((page) => page.rows) ?? [], [matrix.data]);
  const allEcus = first?.ecus ?? [];
  const shownEcus = ecuId === ALL ? allEcus : allEcus.filter((e) => e.id === ecuId);

  return (
    <Screen testID="software-matrix-screen">
      <SoftwareHeader place="matrix" title="Software" />
      <Text tone="muted">
        Installed software on every asset against the released baseline of its stage. Choose a status to see only the assets with a
        cell in it.
      </Text>
      {first ? <StatusCountChips counts={first.counts} selected={status} onSelect={setStatus} /> : null}
      <View style={isWide ? styles.filtersWide : styles.filters}>
        <Select
          label="Stage"
          value={stageId}
          onChange={setStageId}
          options={[{ value: ALL, label: 'All stages' }, ...(stages.data ?? []).filter((s) => !s.retired).map((s) => ({ value: s.id, label: s.name }))]}
          testID="matrix-stage"
        />
        {allEcus.length ? (
          <Select
            label="ECU"
            value={ecuId}
            onChange={setEcuId}
            options={[{ value: ALL, label: 'All ECUs' }, ...allEcus.map((e) => ({ value: e.id, label: e.code }))]}
            testID="matrix-ecu"
          />
        ) : null}
      </View>
      {matrix.isPending && filters ? <LoadingState label="Loading the matrix…" /> : null}
      {matrix.isError ? <ErrorState message={errorMessage(matrix.error)} onRetry={() => void matrix.refetch()} retrying={matrix.isFetching} /> : null}
      {first ? (
        <View testID="software-matrix" style={styles.matrix}>
          <Text tone="muted" testID="matrix-total">
            {first.totalAssets === 1 ? '1 asset' : `${first.totalAssets} assets`}
            {status ? ` with a cell ${CONFORMANCE_STATUS_LABELS[status].toLowerCase()}` : ''} · showing {rows.length}
          </Text>
          {rows.length === 0 ? (
            <EmptyState title="No assets match" message="Choose another stage, ECU or status." />
          ) : isWide ? (
            <MatrixTable rows={rows} ecus={shownEcus} />
          ) : (
            <View style={styles.list}>
              {rows.map((row) => (
                <MatrixCard key={row.assetId} row={row} ecus={allEcus} onlyEcuId={ecuId === ALL ? null : ecuId} />
              ))}
            </View>
          )}
          {matrix.hasNextPage ? (
            <Button
              label="Load more"
              variant="secondary"
              loading={matrix.isFetchingNextPage}
              onPress={() => void matrix.fetchNextPage()}
              testID="matrix-more"
            />
          ) : null}
        </View>
      ) : null}
    </Screen>
  );
}

function StatusCountChips({
  counts,
  selected,
  onSelect,
}: {
  counts: StatusCounts;
  selected: ConformanceStatus | null;
  onSelect: (status: ConformanceStatus | null) => void;
}) {
  return (
    <View style={styles.chips} role="group" aria-label="Cells per status">
      {CONFORMANCE_STATUSES.map((status) => {
        const label = `${CONFORMANCE_STATUS_LABELS[status]}: ${counts[status]}`;
        return (
          <Chip
            key={status}
            label={label}
            selected={selected === status}
            onPress={() => onSelect(selected === status ? null : status)}
            accessibilityLabel={`${label} cells. ${selected === status ? 'Showing only these; press to show all.' : 'Press to show only assets with these.'}`}
            testID={`status-count-${status}`}
          />
        );
      })}
    </View>
  );
}

// Column widths in px: the table scrolls sideways on narrower windows.
const TAG_WIDTH = 168;
const SCORE_WIDTH = 96;
const CELL_WIDTH = 120;

/** `position: sticky` keeps the tag column in view while the cells scroll (web only; native scrolls it along). */
const stickyColumn: ViewStyle | null =
  Platform.OS === 'web' ? ({ position: 'sticky', left: 0, zIndex: 1 } as unknown as ViewStyle) : null;

function MatrixTable({ rows, ecus }: { rows: MatrixRow[]; ecus: Ecu[] }) {
  return (
    <ScrollView horizontal style={styles.tableScroll} role="table" aria-label="Software matrix">
      <View>
        <View style={[styles.row, styles.headerRow]} role="row">
          <View style={[styles.tagCell, styles.headerCell, stickyColumn]} role="columnheader">
            <Text variant="label" tone="muted">
              Asset
            </Text>
          </View>
          <View style={[styles.scoreCell, styles.headerCell]} role="columnheader">
            <Text variant="label" tone="muted">
              On baseline
            </Text>
          </View>
          {ecus.map((ecu) => (
            <View key={ecu.id} style={[styles.ecuCell, styles.headerCell]} role="columnheader" accessibilityLabel={`${ecu.code}, ${ecu.name}`}>
              <Text variant="label">{ecu.code}</Text>
              <Text variant="caption" tone="muted" numberOfLines={1}>
                {ecu.name}
              </Text>
            </View>
          ))}
        </View>
        {rows.map((row) => {
          const cells = new Map(row.cells.map((cell) => [cell.ecuId, cell]));
          return (
            <View key={row.assetId} style={styles.row} role="row" testID={`matrix-row-${row.tag}`}>
              <View style={[styles.tagCell, styles.bodyTagCell, stickyColumn]} role="rowheader">
                <AssetLink row={row} />
                <Text variant="caption" tone="muted" numberOfLines={1}>
                  {row.stage}
                </Text>
              </View>
              <View style={styles.scoreCell} role="cell">
                <Text variant="label">{scoreText(row)}</Text>
              </View>
              {ecus.map((ecu) => {
                const cell = cells.get(ecu.id);
                return (
                  <View key={ecu.id} style={styles.ecuCell} role="cell">
                    {cell ? (
                      <VersionCell
                        installed={cell.installed}
                        status={cell.status}
                        accessibilityLabel={`${row.tag} ${cellDescription(ecu.code, cell.installed, cell.target, cell.status)}`}
                        testID={`matrix-cell-${row.tag}-${ecu.code}`}
                      />
                    ) : (
                      <Text tone="muted" accessibilityLabel={`${row.tag} does not carry ${ecu.code}`}>
                        Not carried
                      </Text>
                    )}
                  </View>
                );
              })}
            </View>
          );
        })}
      </View>
    </ScrollView>
  );
}

function scoreText(row: MatrixRow): string {
  return row.score.expected === 0 ? 'No baseline' : `${row.score.onBaseline} / ${row.score.expected}`;
}

function AssetLink({ row }: { row: MatrixRow }) {
  return (
    <LinkPressable href={`/assets/${row.assetId}/software`} style={styles.tagLink} accessibilityLabel={`Software of ${row.tag}`}>
      <Text variant="bodyStrong" tone="primary" numberOfLines={1} style={styles.underline}>
        {row.tag}
      </Text>
    </LinkPressable>
  );
}

/** On a phone: one card per asset with its score and only the ECUs that are off the baseline. */
function MatrixCard({ row, ecus, onlyEcuId }: { row: MatrixRow; ecus: Ecu[]; onlyEcuId: string | null }) {
  const codeOf = new Map(ecus.map((e) => [e.id, e.code]));
  const off = row.cells.filter((cell) => cell.status !== 'on-baseline' && (onlyEcuId === null || cell.ecuId === onlyEcuId));
  return (
    <Card testID={`matrix-row-${row.tag}`} style={styles.card}>
      <View style={styles.cardHead}>
        <AssetLink row={row} />
        <Text variant="label">
          {row.score.expected === 0 ? 'No released baseline' : `${row.score.onBaseline} of ${row.score.expected} on baseline`}
        </Text>
      </View>
      <Text variant="caption" tone="muted">
        {row.stage}
      </Text>
      {off.length === 0 ? (
        <Text tone="success">Every ECU is on the baseline.</Text>
      ) : (
        off.map((cell) => {
          const code = codeOf.get(cell.ecuId) ?? 'ECU';
          return (
            <View
              key={cell.ecuId}
              style={styles.offRow}
              accessible
              accessibilityLabel={cellDescription(code, cell.installed, cell.target, cell.status)}
              testID={`matrix-cell-${row.tag}-${code}`}
            >
              <Text variant="label" style={styles.offCode}>
                {code}
              </Text>
              <Text style={styles.offVersion} numberOfLines={1}>
                {cell.installed ?? 'nothing'}
                {cell.target ? ` → ${cell.target}` : ''}
              </Text>
              <StatusTag status={cell.status} />
            </View>
          );
        })
      )}
    </Card>
  );
}

const styles = StyleSheet.create({
  filters: {
    gap: spacing.md,
  },
  filtersWide: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.xl,
  },
  chips: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.sm,
  },
  matrix: {
    gap: spacing.md,
  },
  list: {
    gap: spacing.md,
  },
  tableScroll: {
    borderWidth: 1,
    borderColor: colors.border,
    borderRadius: radii.md,
    backgroundColor: colors.surface,
  },
  row: {
    flexDirection: 'row',
    borderBottomWidth: 1,
    borderBottomColor: colors.border,
    minHeight: sizes.touch + spacing.lg,
  },
  headerRow: {
    backgroundColor: colors.surfaceMuted,
  },
  headerCell: {
    backgroundColor: colors.surfaceMuted,
  },
  tagCell: {
    width: TAG_WIDTH,
    paddingHorizontal: spacing.md,
    paddingVertical: spacing.xs,
    justifyContent: 'center',
    borderRightWidth: 1,
    borderRightColor: colors.border,
  },
  bodyTagCell: {
    backgroundColor: colors.surface,
  },
  scoreCell: {
    width: SCORE_WIDTH,
    paddingHorizontal: spacing.sm,
    justifyContent: 'center',
  },
  ecuCell: {
    width: CELL_WIDTH,
    padding: spacing.xs,
    justifyContent: 'center',
  },
  tagLink: {
    minHeight: sizes.touch,
    justifyContent: 'center',
  },
  underline: {
    textDecorationLine: 'underline',
  },
  card: {
    gap: spacing.xs,
  },
  cardHead: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    justifyContent: 'space-between',
    alignItems: 'center',
    gap: spacing.sm,
  },
  offRow: {
    flexDirection: 'row',
    alignItems: 'center',
    gap: spacing.sm,
    minHeight: sizes.touch,
    borderTopWidth: 1,
    borderTopColor: colors.border,
  },
  offCode: {
    width: 56,
  },
  offVersion: {
    flex: 1,
  },
});
