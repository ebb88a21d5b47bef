import { useRouter } from 'expo-router';
import { useEffect, useMemo, useState } from 'react';
import { FlatList, StyleSheet, View } from 'react-native';
import { addDays, dayKey, parseDay } from '@/components/fleet/fleet-time';
import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { Chip } from '@/components/ui/chip';
import { LinkPressable } from '@/components/ui/link-pressable';
import { Select } from '@/components/ui/select';
import { EmptyState, ErrorState, LoadingState, Notice } from '@/components/ui/states';
import { Text } from '@/components/ui/text';
import { colors, radii, sizes, spacing } from '@/components/theme/tokens';
import { errorMessage, isApiError } from '@/hooks/api/api-client';
import { downloadWithToken } from '@/hooks/api/download';
import { reflashCsvPath, useReflashDoneMutation, useReflashQuery, type ReflashFilters } from '@/hooks/queries/software';
import { useStagesQuery } from '@/hooks/queries/stages';
import { useValidationTestsQuery } from '@/hooks/queries/validation';
import { useBreakpoints } from '@/hooks/use-breakpoints';
import { useSession } from '@/hooks/use-session';
import { ASSIGNMENT_PURPOSE_LABELS, type AssignmentPurpose } from '@/shared/schemas/fleet';
import type { PlannedUse, ReflashEntry } from '@/shared/schemas/software';
import { DayField } from '@/components/ui/date-field';
import { FlashForm, type FlashValues } from './flash-form';
import { SoftwareHeader } from './software-header';
import { formatDateTime, formatDay, softwareCan } from './software-words';
import { StatusTag } from './status-tag';

const ALL = 'all';

/** The filter as it stands in the address: `?stageId=&before=YYYY-MM-DD&testId=`. */
export type ReflashParams = { stageId?: string; before?: string; testId?: string };

const QUICK_DAYS: ReadonlyArray<{ label: string; days: number }> = [
  { label: 'Today', days: 0 },
  { label: 'In 3 days', days: 3 },
  { label: 'In a week', days: 7 },
  { label: 'In 2 weeks', days: 14 },
];

/** "booked drive (durability route)", "campaign “Humid soak”", ... */
function planWords(use: PlannedUse): string {
  switch (use.kind) {
    case 'drive':
      return use.name === 'other'
        ? 'booked drive'
        : `booked drive (${(ASSIGNMENT_PURPOSE_LABELS[use.name as AssignmentPurpose] ?? use.name).toLowerCase()})`;
    case 'campaign':
      return `campaign “${use.name}”`;
    case 'test':
      return `validation test “${use.name}”`;
    case 'gate':
      return `gate review of ${use.name}`;
  }
}

/** The line that says by when an entry is needed, and for what. */
export function neededText(use: PlannedUse | null): string {
  if (!use) return 'No planned use booked.';
  const what = planWords(use);
  if (use.underWay) return `Needed now: the ${what} is under way.`;
  if (!use.at) return `Needed for the ${what}; no date set yet.`;
  const when = use.kind === 'drive' || use.kind === 'campaign' ? formatDateTime(use.at) : formatDay(use.at);
  return `Needed by ${when} for the ${what}.`;
}

/** Which ECUs must be flashed, with what, before a chosen day or test; marking one done records the flash. */
export function SoftwareReflashScreen({ params }: { params: ReflashParams }) {
  const router = useRouter();
  const { user, currentProgramId, currentProgram } = useSession();
  const { isWide } = useBreakpoints();
  const stageId = params.stageId || undefined;
  const before = parseDay(params.before) ? params.before : undefined;
  const testId = params.testId || undefined;
  const [exporting, setExporting] = useState(false);
  const [notice, setNotice] = useState<{ tone: 'success' | 'danger'; message: string } | null>(null);
  const [flashing, setFlashing] = useState<string | null>(null);
  const [filtersOpen, setFiltersOpen] = useState(false);
  const stages = useStagesQuery(currentProgramId);
  const filters: ReflashFilters | null = currentProgramId ? { programId: currentProgramId, stageId, before, testId } : null;
  const list = useReflashQuery(filters);
  const done = useReflashDoneMutation();
  const canFlash = softwareCan.recordFlash(user?.role);

  const setFilter = (change: Partial<ReflashParams>) => {
    setNotice(null);
    setFlashing(null);
    router.setParams(change);
  };

  const exportCsv = async () => {
    if (!filters) return;
    setExporting(true);
    setNotice(null);
    try {
      const name = await downloadWithToken(reflashCsvPath(filters), `reflash-${currentProgram?.code ?? 'program'}.csv`);
      setNotice({ tone: 'success', message: `Saved ${name}.` });
    } catch (error) {
      setNotice({ tone: 'danger', message: errorMessage(error) });
    } finally {
      setExporting(false);
    }
  };

  const markDone = async (entry: ReflashEntry, values: FlashValues) => {
    if (!entry.flashTo) return;
    setNotice(null);
    try {
      await done.mutateAsync({
        assetId: entry.assetId,
        ecuId: entry.ecuId,
        version: entry.flashTo,
        recordVersion: entry.recordVersion ?? undefined,
        softwareNumber: values.softwareNumber,
        hardwareNumber: values.hardwareNumber,
        ecuSerial: values.ecuSerial,
        flashedAt: values.flashedAt,
        note: values.note,
      });
      setFlashing(null);
      setNotice({ tone: 'success', message: `Recorded: ${entry.ecuCode} on ${entry.tag} flashed to ${entry.flashTo}.` });
    } catch (error) {
      if (isApiError(error) && error.status === 409) {
        setFlashing(null);
        setNotice({ tone: 'danger', message: `${errorMessage(error)} The list is refreshed: check the entry and record again if it is still needed.` });
        return;
      }
      throw error;
    }
  };

  const data = list.data;
  const summary = data
    ? `${data.items.length} ECU${data.items.length === 1 ? '' : 's'} to flash on ${data.assets} asset${data.assets === 1 ? '' : 's'}${
        data.test ? ` allocated to “${data.test.name}”` : ''
      }${data.before ? ` needed by the end of ${formatDay(`${data.before}T12:00:00`)}` : ''}.`
    : '';

  const chosenTest = useValidationTestsQuery(currentProgramId).data?.find((t) => t.id === testId) ?? null;
  const stageName = stages.data?.find((s) => s.id === stageId)?.name ?? null;
  const filterWords = [
    stageName ?? 'All stages',
    before ? `needed by ${formatDay(`${before}T12:00:00`)}` : 'any day',
    testId ? `before “${chosenTest?.name ?? data?.test?.name ?? 'the chosen test'}”` : 'any test',
  ].join(' · ');
  const showFilters = isWide || filtersOpen;
  const unlisted = useMemo(() => new Set((data?.stagesWithoutBaseline ?? []).map((s) => s.id)), [data]);

  const header = (
    <View style={styles.gap}>
      <SoftwareHeader place="reflash" title="Reflash list" />
      <Text tone="muted">
        ECUs off their stage’s released baseline, with the version to flash. Choose a day or a validation test to see only what must be
        flashed before it.
      </Text>
      {!isWide ? (
        <View style={styles.line}>
          <Text style={styles.flex} testID="reflash-filter-summary">
            {filterWords}
          </Text>
          <Button
            label={filtersOpen ? 'Hide filters' : 'Filters'}
            variant="secondary"
            compact
            onPress={() => setFiltersOpen((v) => !v)}
            accessibilityHint="Shows the stage, day and test to filter by"
            testID="reflash-filters-toggle"
          />
        </View>
      ) : null}
      {showFilters ? (
        <View style={styles.gap} testID="reflash-filters">
          <View style={[styles.filters, isWide && styles.filtersWide]}>
            <View style={isWide ? styles.filterColumn : undefined}>
              <Select
                label="Stage"
                value={stageId ?? ALL}
                onChange={(value) => setFilter({ stageId: value === ALL ? undefined : value })}
                options={[{ value: ALL, label: 'All stages' }, ...(stages.data ?? []).filter((s) => !s.retired).map((s) => ({ value: s.id, label: s.name }))]}
                testID="reflash-stage"
              />
            </View>
            <View style={isWide ? styles.filterColumn : undefined}>
              <BeforeDayFilter value={before} onChange={(value) => setFilter({ before: value })} />
            </View>
          </View>
          <TestFilter
            programId={currentProgramId}
            stageId={stageId}
            testId={testId}
            unlisted={unlisted}
            onChange={(value) => setFilter({ testId: value })}
          />
        </View>
      ) : null}
      <View style={styles.actions}>
        <Button
          label="Export CSV"
          icon="download"
          variant="secondary"
          compact
          loading={exporting}
          onPress={() => void exportCsv()}
          accessibilityHint="Downloads the reflash list with the filters chosen here"
          testID="reflash-export"
        />
      </View>
      {notice ? <Notice tone={notice.tone} message={notice.message} testID="reflash-notice" /> : null}
      {data ? (
        <Text variant="bodyStrong" testID="reflash-total" aria-live="polite">
          {summary}
        </Text>
      ) : null}
      {data?.stagesWithoutBaseline.length ? (
        <Notice
          tone="warning"
          message={`No released baseline for ${data.stagesWithoutBaseline.map((s) => s.name).join(', ')}: nothing on ${
            data.stagesWithoutBaseline.length === 1 ? 'it' : 'them'
          } can be listed.`}
        />
      ) : null}
      {list.isPending && filters ? <LoadingState label="Loading the reflash list…" /> : null}
      {list.isError ? <ErrorState message={errorMessage(list.error)} onRetry={() => void list.refetch()} retrying={list.isFetching} /> : null}
    </View>
  );

  const filtered = Boolean(before || testId || stageId);
  return (
    <View style={styles.fill} testID="software-reflash-screen">
      <FlatList
        testID="reflash-list"
        style={styles.fill}
        data={data?.items ?? []}
        keyExtractor={(entry) => `${entry.assetId}-${entry.ecuId}`}
        ListHeaderComponent={header}
        ListEmptyComponent={
          data ? (
            <EmptyState
              title="Nothing to flash"
              message={filtered ? 'No ECU off its baseline on the assets this filter keeps.' : 'Every ECU is on its baseline.'}
              testID="reflash-empty"
            />
          ) : null
        }
        keyboardShouldPersistTaps="handled"
        contentContainerStyle={[styles.content, isWide ? styles.contentWide : styles.contentPhone]}
        renderItem={({ item }) => {
          const key = `${item.assetId}-${item.ecuId}`;
          return (
            <ReflashCard
              entry={item}
              wide={isWide}
              canFlash={canFlash}
              open={flashing === key}
              onOpen={() => {
                setNotice(null);
                setFlashing(key);
              }}
              onClose={() => setFlashing(null)}
              onDone={(values) => markDone(item, values)}
            />
          );
        }}
      />
    </View>
  );
}

/** The day before which flashes are needed: a date, or a quick choice; none for every day. */
function BeforeDayFilter({ value, onChange }: { value: string | undefined; onChange: (value: string | undefined) => void }) {
  const [text, setText] = useState(value ?? '');
  useEffect(() => setText(value ?? ''), [value]);
  const today = useMemo(() => new Date(), []);
  const bad = text !== '' && !parseDay(text);
  const change = (next: string) => {
    setText(next);
    if (next === '') onChange(undefined);
    else if (parseDay(next)) onChange(next);
  };
  return (
    <View style={styles.gapSm}>
      <DayField
        label="Needed on or before"
        value={text}
        onChange={change}
        error={bad ? 'Use a date like 2026-12-31.' : undefined}
        hint={value ? `Assets in use by the end of ${formatDay(`${value}T12:00:00`)}.` : 'Any day: every asset off its baseline.'}
        testID="reflash-before"
      />
      <View style={styles.chips} role="group" aria-label="Quick days">
        {QUICK_DAYS.map((choice) => {
          const day = dayKey(addDays(today, choice.days));
          return <Chip key={choice.label} label={choice.label} selected={value === day} onPress={() => change(day)} testID={`reflash-before-${choice.days}`} />;
        })}
        {value ? <Chip label="Any day" onPress={() => change('')} testID="reflash-before-any" /> : null}
      </View>
    </View>
  );
}

/** The validation test to flash before: the tests with assets still to run (of the chosen stage). */
function TestFilter({
  programId,
  stageId,
  testId,
  unlisted,
  onChange,
}: {
  programId: string | null;
  stageId: string | undefined;
  testId: string | undefined;
  /** Stages without a released baseline: nothing on them can be listed, so their tests are not offered. */
  unlisted: ReadonlySet<string>;
  onChange: (value: string | undefined) => void;
}) {
  const tests = useValidationTestsQuery(programId);
  const [open, setOpen] = useState(false);
  const all = tests.data ?? [];
  const chosen = all.find((t) => t.id === testId) ?? null;
  const options = all
    .filter((t) => (!stageId || t.stageId === stageId) && !unlisted.has(t.stageId) && t.allocations.some((a) => a.status !== 'passed'))
    .map((t) => {
      const open = t.allocations.filter((a) => a.status !== 'passed').length;
      return { value: t.id, label: t.name, description: `${t.stage} · ${open} asset${open === 1 ? '' : 's'} to test` };
    });
  return (
    <View style={styles.testFilter} testID="reflash-test-filter">
      <Text variant="label">Before a validation test</Text>
      <Text testID="reflash-test-chosen">{testId ? (chosen ? `${chosen.name} · ${chosen.stage}` : 'The chosen test') : 'Any test'}</Text>
      <View style={styles.actions}>
        {testId ? (
          <Button label="Any test" variant="ghost" compact onPress={() => onChange(undefined)} accessibilityLabel="Show every test" testID="reflash-test-clear" />
        ) : null}
        <Button
          label={open ? 'Close the list' : 'Choose a test'}
          variant="secondary"
          compact
          onPress={() => setOpen((v) => !v)}
          testID="reflash-test-toggle"
        />
      </View>
      {open ? (
        tests.isPending ? (
          <LoadingState label="Loading the tests…" />
        ) : options.length === 0 ? (
          <Text tone="muted">No test {stageId ? 'of this stage ' : 'of a stage with a released baseline '}has assets left to run.</Text>
        ) : (
          <Select
            label="Validation test"
            hideLabel
            layout="list"
            value={testId ?? null}
            onChange={(value) => {
              setOpen(false);
              onChange(value);
            }}
            options={options}
            testID="reflash-test"
          />
        )
      ) : null}
    </View>
  );
}

function ReflashCard({
  entry,
  wide,
  canFlash,
  open,
  onOpen,
  onClose,
  onDone,
}: {
  entry: ReflashEntry;
  wide: boolean;
  canFlash: boolean;
  open: boolean;
  onOpen: () => void;
  onClose: () => void;
  onDone: (values: FlashValues) => Promise<void>;
}) {
  const tid = `${entry.tag}-${entry.ecuCode}`;
  const urgent = entry.neededFor?.underWay ?? false;
  return (
    <Card style={styles.card} testID={`reflash-entry-${tid}`}>
      <View style={[styles.cardBody, wide && !open && styles.cardWide]}>
        <View style={styles.cardText}>
          <View style={styles.line}>
            <LinkPressable href={`/assets/${entry.assetId}/software`} style={styles.link} accessibilityLabel={`Software of ${entry.tag}`}>
              <Text variant="bodyStrong" tone="primary" style={styles.underline}>
                {entry.tag}
              </Text>
            </LinkPressable>
            <Text variant="bodyStrong">
              {entry.ecuCode} · {entry.ecuName}
            </Text>
            <StatusTag status={entry.status} />
          </View>
          <Text>
            {entry.installed ?? 'Nothing installed'} → {entry.flashTo ?? 'see the reason'}
          </Text>
          <Text tone={urgent ? 'danger' : 'default'} weight={entry.neededFor ? 'semibold' : undefined} testID={`reflash-needed-${tid}`}>
            {neededText(entry.neededFor)}
          </Text>
          <Text tone="muted">
            {entry.reason}
            {entry.location ? ` · ${entry.location}` : ''} · {entry.stage}
          </Text>
        </View>
        {canFlash && entry.flashTo && !open ? (
          <Button
            label="Mark flashed…"
            compact
            onPress={onOpen}
            accessibilityLabel={`Mark flashed: ${entry.ecuCode} on ${entry.tag} to ${entry.flashTo}`}
            testID={`reflash-done-${tid}`}
          />
        ) : null}
      </View>
      {open && entry.flashTo ? (
        <View style={styles.flashPanel}>
          <FlashForm
            ecuCode={entry.ecuCode}
            version={entry.flashTo}
            installed={entry.installed ? { softwareVersion: entry.installed, softwareNumber: '', hardwareNumber: '', ecuSerial: '' } : null}
            lockVersion
            submitLabel="Record the flash"
            testID={`reflash-form-${tid}`}
            onSubmit={onDone}
            onCancel={onClose}
          />
        </View>
      ) : null}
    </Card>
  );
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
    gap: spacing.md,
  },
  contentPhone: {
    paddingHorizontal: spacing.lg,
    paddingTop: spacing.lg,
  },
  contentWide: {
    paddingHorizontal: spacing.xxl,
    paddingTop: spacing.xxl,
  },
  gap: {
    gap: spacing.md,
  },
  gapSm: {
    gap: spacing.sm,
  },
  filters: {
    gap: spacing.md,
  },
  filtersWide: {
    flexDirection: 'row',
    alignItems: 'flex-start',
    gap: spacing.xl,
  },
  filterColumn: {
    flex: 1,
  },
  chips: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.sm,
  },
  testFilter: {
    gap: spacing.xs,
  },
  actions: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.sm,
  },
  card: {
    gap: spacing.sm,
  },
  cardBody: {
    gap: spacing.sm,
  },
  cardWide: {
    flexDirection: 'row',
    alignItems: 'center',
  },
  cardText: {
    flex: 1,
    gap: spacing.xs,
  },
  line: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    alignItems: 'center',
    gap: spacing.sm,
  },
  flex: {
    flex: 1,
  },
  link: {
    minHeight: sizes.touch,
    justifyContent: 'center',
  },
  underline: {
    textDecorationLine: 'underline',
  },
  flashPanel: {
    padding: spacing.md,
    borderRadius: radii.md,
    backgroundColor: colors.surfaceMuted,
  },
});
