import { useEffect, useMemo, useRef, useState } from 'react';
import { Linking, Platform, Pressable, StyleSheet, View } from 'react-native';
import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { Badge, Chip } from '@/components/ui/chip';
import { Icon } from '@/components/ui/icon';
import { ProgressBar } from '@/components/ui/progress-bar';
import { Select } from '@/components/ui/select';
import { EmptyState, LoadingState, Notice } from '@/components/ui/states';
import { Heading, Text } from '@/components/ui/text';
import { TextField } from '@/components/ui/text-field';
import { TextLink } from '@/components/ui/text-link';
import { useFocusRing } from '@/components/ui/use-focus-ring';
import { webOnly } from '@/components/ui/web-props';
import { colors, radii, sizes, spacing } from '@/components/theme/tokens';
import { randomId } from '@/hooks/api/ids';
import { useAssetListQuery } from '@/hooks/queries/assets';
import {
  useAllocateAssetMutation,
  useUpdateAllocationMutation,
  useUploadReportMutation,
  type ReportFile,
} from '@/hooks/queries/validation';
import { useDebouncedValue } from '@/hooks/use-debounced-value';
import { useSession } from '@/hooks/use-session';
import {
  ALLOCATION_STATUSES,
  ALLOCATION_STATUS_LABELS,
  type Allocation,
  type AllocationStatus,
  type ValidationTest,
} from '@/shared/schemas/validation';
import { CAN_PICK_DOCUMENTS, pickFile } from './pick-file';
import { canValidation, formatDateTime, reportErrorMessage, reportProblem, validationErrorMessage } from './validation-words';

/** The assets allocated to a test, each with its result, notes, report and the finding a failure filed. */
export function AllocationsCard({ test }: { test: ValidationTest }) {
  const { user } = useSession();
  const [allocating, setAllocating] = useState(false);
  const [notice, setNotice] = useState<string | null>(null);
  const canPlan = canValidation.planTests(user?.role);
  const canRecord = canValidation.recordResults(user?.role);
  const allocations = [...test.allocations].sort((a, b) => a.assetTag.localeCompare(b.assetTag));

  return (
    <Card testID="vtest-allocations">
      <View style={styles.head}>
        <View style={styles.grow}>
          <Heading level={2} variant="heading">
            Allocated assets
          </Heading>
          <Text variant="caption" tone="muted">
            {test.allocations.length} allocated · {test.passedSamples} of {test.requiredSamples} needed passed
          </Text>
        </View>
        {canPlan && !allocating ? (
          <Button
            label="Allocate an asset"
            icon="plus"
            variant="secondary"
            compact
            onPress={() => {
              setNotice(null);
              setAllocating(true);
            }}
            testID="allocate-asset"
          />
        ) : null}
      </View>
      {notice ? <Notice tone="success" message={notice} testID="allocate-notice" /> : null}
      {allocating ? (
        <AllocatePanel
          test={test}
          onDone={(message) => {
            setAllocating(false);
            setNotice(message);
          }}
        />
      ) : null}
      {allocations.length === 0 ? (
        <EmptyState title="No assets allocated yet" message={canPlan ? 'Allocate the assets that will run this test.' : 'An engineer or lead allocates the assets.'} />
      ) : (
        <View style={styles.list} role="list">
          {allocations.map((allocation) => (
            <AllocationRow key={allocation.id} allocation={allocation} testId={test.id} canRecord={canRecord} />
          ))}
        </View>
      )}
    </Card>
  );
}

const SHOWN = 8;

/** Finds an asset of the program (by default on the test's stage) and allocates it. */
function AllocatePanel({ test, onDone }: { test: ValidationTest; onDone: (message: string | null) => void }) {
  const [search, setSearch] = useState('');
  const [sameStage, setSameStage] = useState(true);
  const [picked, setPicked] = useState<{ id: string; tag: string } | null>(null);
  const [error, setError] = useState<string | null>(null);
  const q = useDebouncedValue(search.trim(), 300);
  const list = useAssetListQuery({ programId: test.programId, stage: sameStage ? test.stageId : undefined, q: q || undefined, sort: 'tag', dir: 'asc' });
  const allocate = useAllocateAssetMutation(test.id);
  const taken = useMemo(() => new Set(test.allocations.map((a) => a.assetId)), [test.allocations]);
  const items = list.data?.pages[0]?.items.slice(0, SHOWN) ?? [];

  const submit = async () => {
    if (!picked) {
      setError('Choose an asset first.');
      return;
    }
    setError(null);
    try {
      await allocate.mutateAsync({ assetId: picked.id });
      onDone(`${picked.tag} is allocated to this test.`);
    } catch (e) {
      setError(validationErrorMessage(e));
    }
  };

  return (
    <View style={styles.panel} testID="allocate-panel">
      <TextField
        label="Find an asset"
        value={search}
        onChangeText={(value) => {
          setSearch(value);
          setPicked(null);
        }}
        placeholder="Tag, VIN or words"
        autoCapitalize="characters"
        autoCorrect={false}
        inputMode="search"
        testID="allocate-search"
      />
      <View style={styles.buttons}>
        <Chip
          kind="checkbox"
          label={`Only assets on ${test.stage}`}
          selected={sameStage}
          onPress={() => {
            setSameStage((v) => !v);
            setPicked(null);
          }}
          testID="allocate-same-stage"
        />
      </View>
      {list.isPending ? <LoadingState label="Looking for assets…" /> : null}
      {list.isError ? <Notice message={validationErrorMessage(list.error)} /> : null}
      {list.isSuccess && items.length === 0 ? <Text tone="muted">No asset matches.</Text> : null}
      {items.length > 0 ? (
        <Select
          label="Asset"
          layout="list"
          value={picked?.id ?? null}
          onChange={(id) => {
            const asset = items.find((a) => a.id === id);
            if (asset) setPicked({ id: asset.id, tag: asset.tag });
          }}
          options={items.map((asset) => ({
            value: asset.id,
            label: asset.tag,
            description: taken.has(asset.id) ? `${asset.stage} · already allocated` : `${asset.stage} · ${asset.location || 'no location'}`,
            disabled: taken.has(asset.id),
            testID: `allocate-option-${asset.tag}`,
          }))}
        />
      ) : null}
      {error ? <Notice message={error} testID="allocate-error" /> : null}
      <View style={styles.buttons}>
        <Button label={picked ? `Allocate ${picked.tag}` : 'Allocate'} onPress={() => void submit()} loading={allocate.isPending} testID="allocate-submit" />
        <Button label="Cancel" variant="ghost" onPress={() => onDone(null)} testID="allocate-cancel" />
      </View>
    </View>
  );
}

const STATUS_TONES: Record<AllocationStatus, 'neutral' | 'primary' | 'success' | 'danger'> = {
  planned: 'neutral',
  running: 'primary',
  passed: 'success',
  failed: 'danger',
};

function AllocationRow({ allocation, testId, canRecord }: { allocation: Allocation; testId: string; canRecord: boolean }) {
  const update = useUpdateAllocationMutation(testId);
  const [notes, setNotes] = useState(allocation.resultNotes);
  const [savedNotes, setSavedNotes] = useState(allocation.resultNotes);
  const [error, setError] = useState<string | null>(null);
  const tid = `allocation-${allocation.id}`;
  // Someone else's notes arrive with a reload; keep what the user is typing.
  if (allocation.resultNotes !== savedNotes && notes === savedNotes) {
    setSavedNotes(allocation.resultNotes);
    setNotes(allocation.resultNotes);
  }
  const notesChanged = notes.trim() !== allocation.resultNotes.trim();

  const send = async (change: { status?: AllocationStatus; resultNotes?: string }) => {
    setError(null);
    try {
      const saved = await update.mutateAsync({ id: allocation.id, version: allocation.version, ...change });
      setSavedNotes(saved.resultNotes);
      setNotes(saved.resultNotes);
    } catch (e) {
      setError(validationErrorMessage(e));
    }
  };

  // A failure files a finding whose description is the notes: send typed notes with it.
  const setStatus = (status: AllocationStatus) => {
    if (status === allocation.status) return;
    void send(notesChanged ? { status, resultNotes: notes.trim() } : { status });
  };

  return (
    <View style={[styles.row, allocation.status === 'failed' && styles.rowFailed]} testID={tid} role="listitem">
      <View style={styles.head}>
        <View style={styles.grow}>
          <TextLink href={`/assets/${allocation.assetId}`} label={allocation.assetTag} testID={`${tid}-asset`} />
          <Text variant="caption" tone="muted">
            Last change {formatDateTime(allocation.updatedAt)}
          </Text>
        </View>
        <Badge label={ALLOCATION_STATUS_LABELS[allocation.status]} tone={STATUS_TONES[allocation.status]} testID={`${tid}-status`} />
      </View>
      {canRecord ? (
        <>
          <Select
            label={`Result of ${allocation.assetTag}`}
            layout="chips"
            value={allocation.status}
            onChange={setStatus}
            options={ALLOCATION_STATUSES.map((status) => ({ value: status, label: ALLOCATION_STATUS_LABELS[status], testID: `${tid}-status-${status}` }))}
            hint={allocation.status === 'failed' ? undefined : 'Failed files a blocking finding on the asset; write what happened in the notes first.'}
          />
          <TextField
            label="Result notes"
            value={notes}
            onChangeText={setNotes}
            multiline
            numberOfLines={3}
            placeholder="What was measured, what happened"
            testID={`${tid}-notes`}
          />
          {notesChanged ? (
            <Button label="Save notes" variant="secondary" compact onPress={() => void send({ resultNotes: notes.trim() })} loading={update.isPending} testID={`${tid}-save-notes`} />
          ) : null}
        </>
      ) : allocation.resultNotes ? (
        <Text>{allocation.resultNotes}</Text>
      ) : null}
      {update.isPending ? (
        <Text variant="caption" tone="muted" aria-live="polite">
          Saving…
        </Text>
      ) : null}
      {error ? <Notice message={error} testID={`${tid}-error`} /> : null}
      {allocation.findingId ? (
        <View style={styles.finding}>
          <Icon name="warning" size={sizes.iconSm} color={colors.danger} />
          <TextLink href={`/findings/${allocation.findingId}`} label="Finding filed" testID={`${tid}-finding`} />
        </View>
      ) : null}
      <ReportSection allocation={allocation} canAttach={canRecord} />
    </View>
  );
}

type Job = { file: ReportFile; key: string; progress: number; status: 'sending' | 'failed'; error: string | null };

function ReportSection({ allocation, canAttach }: { allocation: Allocation; canAttach: boolean }) {
  const upload = useUploadReportMutation();
  const [job, setJob] = useState<Job | null>(null);
  const [pickError, setPickError] = useState<string | null>(null);
  const mounted = useRef(true);
  useEffect(() => {
    mounted.current = true;
    return () => {
      mounted.current = false;
    };
  }, []);
  const tid = `allocation-${allocation.id}-report`;

  const send = async (file: ReportFile, key: string) => {
    setJob({ file, key, progress: 0, status: 'sending', error: null });
    try {
      await upload.mutateAsync({
        allocationId: allocation.id,
        file,
        idempotencyKey: key,
        onProgress: (progress) => mounted.current && setJob((j) => (j && j.key === key ? { ...j, progress } : j)),
      });
      if (mounted.current) setJob(null);
    } catch (error) {
      if (mounted.current) setJob({ file, key, progress: 0, status: 'failed', error: reportErrorMessage(error) });
    }
  };

  const choose = async () => {
    setPickError(null);
    let file: ReportFile | null;
    try {
      file = await pickFile('application/pdf,image/*');
    } catch {
      setPickError('The file could not be opened. Try another one.');
      return;
    }
    if (!file) return;
    const problem = reportProblem(file);
    if (problem) {
      setPickError(problem);
      return;
    }
    void send(file, randomId());
  };

  const isPdf = allocation.reportContentType === 'application/pdf';
  return (
    <View style={styles.report}>
      {allocation.reportUrl ? (
        <ExternalLink href={allocation.reportUrl} label={isPdf ? 'Open the report (PDF)' : 'Open the report (picture)'} testID={`${tid}-open`} />
      ) : (
        <Text variant="caption" tone="muted">
          No report attached.
        </Text>
      )}
      {canAttach && job?.status !== 'sending' ? (
        <Button
          label={allocation.reportUrl ? 'Replace the report' : 'Attach a report'}
          icon="plus"
          variant="secondary"
          compact
          onPress={() => void choose()}
          accessibilityHint={CAN_PICK_DOCUMENTS ? 'A PDF or a picture, at most 20 MB.' : 'A picture of the report, at most 20 MB.'}
          testID={`${tid}-attach`}
        />
      ) : null}
      {canAttach ? (
        <Text variant="caption" tone="muted">
          {CAN_PICK_DOCUMENTS ? 'A PDF or a picture, at most 20 MB.' : 'A picture of the report, at most 20 MB; attach a PDF from a computer.'}
        </Text>
      ) : null}
      {pickError ? <Notice message={pickError} testID={`${tid}-error`} /> : null}
      {job?.status === 'sending' ? (
        <ProgressBar value={job.progress} label={`Upload of ${job.file.name}`} caption={`Sending ${job.file.name}… ${Math.round(job.progress * 100)}%`} testID={`${tid}-progress`} />
      ) : null}
      {job?.status === 'failed' ? (
        <View style={styles.failed}>
          <Notice message={job.error ?? 'The report was not sent.'} testID={`${tid}-error`} />
          <View style={styles.buttons}>
            <Button label="Retry" icon="refresh" compact onPress={() => void send(job.file, job.key)} testID={`${tid}-retry`} />
            <Button label="Discard" variant="ghost" compact onPress={() => setJob(null)} />
          </View>
        </View>
      ) : null}
    </View>
  );
}

/** A link out of the app (a signed report URL): a real `<a target=_blank>` on the web. */
function ExternalLink({ href, label, testID }: { href: string; label: string; testID?: string }) {
  const ring = useFocusRing();
  return (
    <Pressable
      role="link"
      {...webOnly({ href, target: '_blank', rel: 'noopener noreferrer' })}
      onPress={(event) => {
        if (Platform.OS === 'web') return;
        event.preventDefault();
        void Linking.openURL(href);
      }}
      onFocus={ring.onFocus}
      onBlur={ring.onBlur}
      testID={testID}
      style={[styles.link, ring.focused && styles.focused]}
    >
      <Text variant="bodyStrong" tone="primary" style={styles.underline}>
        {label}
      </Text>
    </Pressable>
  );
}

const styles = StyleSheet.create({
  head: {
    flexDirection: 'row',
    alignItems: 'flex-start',
    justifyContent: 'space-between',
    gap: spacing.md,
    flexWrap: 'wrap',
  },
  grow: {
    flex: 1,
    minWidth: 160,
  },
  list: {
    gap: spacing.md,
  },
  panel: {
    gap: spacing.md,
    padding: spacing.md,
    borderRadius: radii.md,
    borderWidth: 1,
    borderColor: colors.borderStrong,
    backgroundColor: colors.bg,
  },
  buttons: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.sm,
  },
  row: {
    gap: spacing.sm,
    padding: spacing.md,
    borderRadius: radii.md,
    borderWidth: 1,
    borderColor: colors.border,
    backgroundColor: colors.surface,
  },
  rowFailed: {
    borderColor: colors.danger,
  },
  finding: {
    flexDirection: 'row',
    alignItems: 'center',
    gap: spacing.xs,
  },
  report: {
    gap: spacing.sm,
    paddingTop: spacing.sm,
    borderTopWidth: 1,
    borderTopColor: colors.border,
  },
  failed: {
    gap: spacing.sm,
  },
  link: {
    minHeight: sizes.touch,
    justifyContent: 'center',
    alignSelf: 'flex-start',
    borderRadius: radii.sm,
  },
  underline: {
    textDecorationLine: 'underline',
  },
  focused: {
    outlineColor: colors.focus,
    outlineStyle: 'solid',
    outlineWidth: sizes.focusRing,
  },
});
