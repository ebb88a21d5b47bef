import { zodResolver } from '@hookform/resolvers/zod';
import { useState } from 'react';
import { Controller, useFieldArray, useForm, useWatch, type Control, type FieldPath, type UseFormSetError } from 'react-hook-form';
import { StyleSheet, View } from 'react-native';
import { z } from 'zod';
import { FormTextField } from '@/components/form/form-text-field';
import { applyServerFieldErrors } from '@/components/form/server-errors';
import { dayKey } from '@/components/fleet/fleet-time';
import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { Badge, type BadgeTone } from '@/components/ui/chip';
import { Screen } from '@/components/ui/screen';
import { Select } from '@/components/ui/select';
import { EmptyState, ErrorState, LoadingState, Notice } from '@/components/ui/states';
import { Heading, Text } from '@/components/ui/text';
import { colors, radii, spacing } from '@/components/theme/tokens';
import { errorMessage, fieldErrors, isApiError } from '@/hooks/api/api-client';
import {
  baselineConflictCurrent,
  useBaselineDiffQuery,
  useBaselineQuery,
  useBaselinesQuery,
  useCreateBaselineMutation,
  useDeleteBaselineMutation,
  useEcusQuery,
  useReleaseBaselineMutation,
  useUpdateBaselineMutation,
} from '@/hooks/queries/software';
import { useStagesQuery } from '@/hooks/queries/stages';
import { useBreakpoints } from '@/hooks/use-breakpoints';
import { useSession } from '@/hooks/use-session';
import { SOFTWARE_ERROR_SENTENCES } from '@/shared/api/software-paths';
import { versionProblem } from '@/shared/domain/software';
import {
  CreateBaselineSchema,
  RangeSchema,
  SemverSchema,
  SoftwareVersionSchema,
  type Baseline,
  type BaselineStatus,
  type BaselineSummary,
  type Ecu,
  type UpdateBaseline,
} from '@/shared/schemas/software';
import { SoftwareHeader } from './software-header';
import { DayField } from '@/components/ui/date-field';
import { formatDay, softwareCan } from './software-words';

const STATUS_WORDS: Record<BaselineStatus, { label: string; tone: BadgeTone }> = {
  draft: { label: 'Draft', tone: 'warning' },
  released: { label: 'Released', tone: 'success' },
  superseded: { label: 'Superseded', tone: 'neutral' },
};

const EMPTY = 'empty';

const baselineTitle = (b: Pick<BaselineSummary, 'name' | 'releaseLabel'>) => `${b.name}${b.releaseLabel ? ` · ${b.releaseLabel}` : ''}`;

/** Baselines per stage: open one to read its targets and rules; start, edit, delete and release drafts; compare two. */
export function BaselinesScreen() {
  const { user, currentProgramId } = useSession();
  const { isWide } = useBreakpoints();
  const list = useBaselinesQuery(currentProgramId);
  const [openId, setOpenId] = useState<string | null>(null);
  const [creating, setCreating] = useState(false);
  const [notice, setNotice] = useState<string | null>(null);
  const canEdit = softwareCan.editBaselines(user?.role);
  const items = list.data ?? [];
  const stages = [...new Map(items.map((b) => [b.stageId, b.stage])).entries()];

  const open = (id: string) => {
    setCreating(false);
    setNotice(null);
    setOpenId(id);
  };

  const listView = (
    <View style={styles.gap} testID="baseline-list">
      {canEdit && !creating ? (
        <View style={styles.actions}>
          <Button
            label="New draft"
            icon="plus"
            compact
            onPress={() => {
              setNotice(null);
              setCreating(true);
              setOpenId(null);
            }}
            testID="baseline-new"
          />
        </View>
      ) : null}
      {list.isPending && currentProgramId ? <LoadingState label="Loading baselines…" /> : null}
      {list.isError ? <ErrorState message={errorMessage(list.error)} onRetry={() => void list.refetch()} /> : null}
      {list.data && items.length === 0 ? <EmptyState title="No baselines yet" message={canEdit ? 'Start a new draft.' : undefined} /> : null}
      {stages.map(([stageId, stage]) => (
        <View key={stageId} style={styles.gap}>
          <Heading level={2} variant="heading">
            {stage}
          </Heading>
          {items
            .filter((b) => b.stageId === stageId)
            .map((b) => (
              <Card key={b.id} style={[styles.summary, openId === b.id && styles.open]} testID={`baseline-card-${b.id}`}>
                <View style={styles.flex}>
                  <Text variant="bodyStrong">{baselineTitle(b)}</Text>
                  <Text variant="caption" tone="muted">
                    {formatDay(b.date)} · {b.targetCount} targets · {b.ruleCount} rules
                  </Text>
                </View>
                <Badge label={STATUS_WORDS[b.status].label} tone={STATUS_WORDS[b.status].tone} testID={`baseline-status-${b.id}`} />
                <Button
                  label={openId === b.id ? 'Opened' : 'Open'}
                  variant="secondary"
                  compact
                  onPress={() => open(b.id)}
                  accessibilityLabel={`Open ${b.name}`}
                  testID={`baseline-open-${b.id}`}
                />
              </Card>
            ))}
        </View>
      ))}
    </View>
  );

  const opened = items.find((b) => b.id === openId) ?? null;
  const detail =
    creating && currentProgramId ? (
      <NewDraftForm
        programId={currentProgramId}
        baselines={items}
        onCreated={(created) => {
          setCreating(false);
          setOpenId(created.id);
          setNotice(`Draft “${created.name}” started. Edit its targets and rules, then release it.`);
        }}
        onCancel={() => setCreating(false)}
      />
    ) : opened ? (
      <BaselineDetail
        key={opened.id}
        summary={opened}
        released={items.find((b) => b.stageId === opened.stageId && b.status === 'released' && b.id !== opened.id) ?? null}
        canEdit={canEdit}
        programId={currentProgramId}
        onDeleted={(name) => {
          setOpenId(null);
          setNotice(`Draft “${name}” deleted.`);
        }}
      />
    ) : (
      <Text tone="muted">Open a baseline to see its targets and rules.</Text>
    );

  return (
    <Screen testID="baselines-screen">
      <SoftwareHeader place="baselines" title="Baselines" />
      {notice ? <Notice tone="success" message={notice} testID="baseline-notice" /> : null}
      {isWide ? (
        <View style={styles.columns}>
          <View style={styles.column}>{listView}</View>
          <View style={styles.column}>{detail}</View>
        </View>
      ) : (
        <>
          {creating ? detail : null}
          {listView}
          {creating ? null : detail}
        </>
      )}
      {items.length >= 2 ? <DiffPanel baselines={items} /> : null}
    </Screen>
  );
}

// ---- A new draft ----------------------------------------------------------------------------

const NewDraftSchema = z.object({
  stageId: z.string().min(1, 'Choose a stage.'),
  name: CreateBaselineSchema.shape.name,
  releaseLabel: z.string().trim().max(40, 'Use at most 40 characters.'),
  date: CreateBaselineSchema.shape.date,
  notes: z.string().trim().max(4000, 'Use at most 4000 characters.'),
  /** A released baseline to copy targets and rules from, or EMPTY. */
  copyFromId: z.string(),
});
type NewDraftInput = z.input<typeof NewDraftSchema>;
type NewDraftOutput = z.output<typeof NewDraftSchema>;
const NEW_DRAFT_FIELDS = ['stageId', 'name', 'releaseLabel', 'date', 'notes', 'copyFromId'] as const;

function NewDraftForm({
  programId,
  baselines,
  onCreated,
  onCancel,
}: {
  programId: string;
  baselines: BaselineSummary[];
  onCreated: (created: Baseline) => void;
  onCancel: () => void;
}) {
  const stages = useStagesQuery(programId);
  const create = useCreateBaselineMutation();
  const [formError, setFormError] = useState<string | null>(null);
  const released = baselines.filter((b) => b.status === 'released');
  const { control, handleSubmit, setError, setValue } = useForm<NewDraftInput, unknown, NewDraftOutput>({
    resolver: zodResolver(NewDraftSchema),
    defaultValues: { stageId: '', name: '', releaseLabel: '', date: dayKey(new Date()), notes: '', copyFromId: EMPTY },
  });
  const stageId = useWatch({ control, name: 'stageId' });
  const copyFromId = useWatch({ control, name: 'copyFromId' });
  const supersedes = released.find((b) => b.stageId === stageId) ?? null;
  const source = released.find((b) => b.id === copyFromId) ?? null;

  const onSubmit = handleSubmit(async (values) => {
    setFormError(null);
    try {
      const created = await create.mutateAsync({
        programId,
        stageId: values.stageId,
        name: values.name,
        releaseLabel: values.releaseLabel,
        date: values.date,
        notes: values.notes,
        copyFromId: values.copyFromId === EMPTY ? undefined : values.copyFromId,
      });
      onCreated(created);
    } catch (error) {
      if (!applyServerFieldErrors(error, setError, NEW_DRAFT_FIELDS)) setFormError(errorMessage(error, SOFTWARE_ERROR_SENTENCES));
    }
  });

  return (
    <Card style={styles.gap} testID="baseline-new-form">
      <Heading level={2} variant="heading">
        New draft
      </Heading>
      <Controller
        control={control}
        name="stageId"
        render={({ field, fieldState }) => (
          <Select
            label="Stage"
            value={field.value || null}
            onChange={(value) => {
              field.onChange(value);
              // Start from the stage's released baseline, the one this draft will supersede.
              const current = released.find((b) => b.stageId === value);
              setValue('copyFromId', current ? current.id : EMPTY);
            }}
            options={(stages.data ?? []).filter((s) => !s.retired).map((s) => ({ value: s.id, label: s.name }))}
            error={fieldState.error?.message}
            testID="baseline-new-stage"
          />
        )}
      />
      <Controller
        control={control}
        name="copyFromId"
        render={({ field }) => (
          <Select
            label="Start from"
            layout="list"
            value={field.value}
            onChange={field.onChange}
            options={[
              { value: EMPTY, label: 'An empty baseline', description: 'No targets, no rules.' },
              ...released.map((b) => ({ value: b.id, label: `A copy of ${baselineTitle(b)}`, description: `${b.stage} · ${b.targetCount} targets, ${b.ruleCount} rules` })),
            ]}
            testID="baseline-new-copy"
          />
        )}
      />
      <FormTextField control={control} name="name" label="Name" placeholder={source ? `${source.name} (next)` : 'FW3 EP release 8'} testID="baseline-new-name" />
      <View style={styles.pair}>
        <View style={styles.grow}>
          <FormTextField control={control} name="releaseLabel" label="Release label (optional)" placeholder="R8" autoCapitalize="characters" testID="baseline-new-label" />
        </View>
        <View style={styles.grow}>
          <Controller
            control={control}
            name="date"
            render={({ field, fieldState }) => (
              <DayField label="Date" value={field.value} onChange={field.onChange} error={fieldState.error?.message} testID="baseline-new-date" />
            )}
          />
        </View>
      </View>
      <FormTextField control={control} name="notes" label="Notes (optional)" multiline numberOfLines={2} testID="baseline-new-notes" />
      {stageId ? (
        <Text tone="muted" testID="baseline-new-supersedes">
          {supersedes
            ? `When released, this draft supersedes ${baselineTitle(supersedes)}, the released baseline of the stage.`
            : 'No baseline is released for this stage yet: this one becomes its first.'}
        </Text>
      ) : null}
      {formError ? <Notice message={formError} testID="baseline-new-error" /> : null}
      <View style={styles.actions}>
        <Button label="Start the draft" compact loading={create.isPending} onPress={() => void onSubmit()} testID="baseline-new-save" />
        <Button label="Cancel" variant="ghost" compact onPress={onCancel} testID="baseline-new-cancel" />
      </View>
    </Card>
  );
}

// ---- One baseline ---------------------------------------------------------------------------

function BaselineDetail({
  summary,
  released,
  canEdit,
  programId,
  onDeleted,
}: {
  summary: BaselineSummary;
  released: BaselineSummary | null;
  canEdit: boolean;
  programId: string | null;
  onDeleted: (name: string) => void;
}) {
  const baseline = useBaselineQuery(summary.id);
  const [editing, setEditing] = useState(false);
  const [confirming, setConfirming] = useState<'release' | 'delete' | null>(null);
  const [notice, setNotice] = useState<string | null>(null);
  const release = useReleaseBaselineMutation(summary.id);
  const remove = useDeleteBaselineMutation();
  if (baseline.isPending) return <LoadingState label="Loading the baseline…" />;
  if (baseline.isError || !baseline.data) return <ErrorState message={errorMessage(baseline.error)} onRetry={() => void baseline.refetch()} />;
  const b = baseline.data;
  const draft = b.status === 'draft';

  const doRelease = () => {
    setNotice(null);
    release.mutate(b.version, {
      onSuccess: () => setConfirming(null),
      onError: (error) => {
        setConfirming(null);
        if (isApiError(error) && error.status === 409) void baseline.refetch();
      },
    });
  };

  const doDelete = () => {
    remove.mutate(b.id, {
      onSuccess: () => onDeleted(b.name),
      onError: (error) => {
        setConfirming(null);
        if (isApiError(error) && error.status === 409) void baseline.refetch();
      },
    });
  };

  return (
    <Card style={styles.gap} testID="baseline-detail">
      <Heading level={2} variant="heading">
        {baselineTitle(b)}
      </Heading>
      <Text tone="muted">
        {b.stage} · {formatDay(b.date)} · {STATUS_WORDS[b.status].label}
        {b.releasedAt ? ` ${formatDay(b.releasedAt)}${b.releasedBy ? ` by ${b.releasedBy.name}` : ''}` : ''}
      </Text>
      {b.notes && !editing ? <Text>{b.notes}</Text> : null}
      {!draft ? (
        <Text tone="muted" testID="baseline-read-only">
          {b.status === 'released' ? 'Released' : 'Superseded'} baselines are read-only. Start a new draft from it to change targets.
        </Text>
      ) : null}
      {notice ? <Notice tone="success" message={notice} /> : null}
      {editing && programId ? (
        <BaselineEditor
          baseline={b}
          programId={programId}
          onDone={(message) => {
            setEditing(false);
            setNotice(message || null);
          }}
        />
      ) : (
        <>
          <Heading level={3} variant="bodyStrong">
            Targets
          </Heading>
          {b.targets.length === 0 ? <Text tone="muted">No targets yet.</Text> : null}
          {b.targets.map((t) => (
            <View key={t.ecuId} style={styles.line} testID={`baseline-target-${t.ecuCode}`}>
              <Text variant="label" style={styles.code}>
                {t.ecuCode}
              </Text>
              <Text style={styles.flex}>{t.ecuName}</Text>
              <Text variant="bodyStrong" selectable>
                {t.version}
              </Text>
            </View>
          ))}
          <Heading level={3} variant="bodyStrong">
            Compatibility rules
          </Heading>
          {b.rules.length === 0 ? <Text tone="muted">No rules.</Text> : null}
          {b.rules.map((r) => (
            <Text key={r.id} testID={`baseline-rule-text-${r.id}`}>
              When {r.whenEcuCode} is {r.whenMinVersion} or later, {r.thenEcuCode} must be {r.range}
              {r.note ? ` (${r.note})` : ''}
            </Text>
          ))}
          {draft && canEdit && !confirming ? (
            <View style={styles.actions}>
              <Button
                label="Edit the draft"
                variant="secondary"
                compact
                onPress={() => {
                  setNotice(null);
                  setEditing(true);
                }}
                testID="baseline-edit"
              />
              <Button label="Release…" compact onPress={() => setConfirming('release')} testID="baseline-release" />
              <Button label="Delete the draft…" variant="danger" compact onPress={() => setConfirming('delete')} testID="baseline-delete" />
            </View>
          ) : null}
          {confirming === 'release' ? (
            <View style={styles.confirm} testID="baseline-release-confirm">
              <Text variant="bodyStrong">Release “{b.name}”?</Text>
              <Text>
                It becomes the baseline of {b.stage} and read-only.{' '}
                {released ? `${baselineTitle(released)} is superseded.` : 'No other baseline is released for this stage.'} The matrix, the reflash
                list and readiness compare every asset of the stage with it from now on.
              </Text>
              <View style={styles.actions}>
                <Button label="Release it" compact loading={release.isPending} onPress={doRelease} testID="baseline-release-yes" />
                <Button label="Cancel" variant="ghost" compact onPress={() => setConfirming(null)} testID="baseline-release-no" />
              </View>
            </View>
          ) : null}
          {confirming === 'delete' ? (
            <View style={styles.confirm} testID="baseline-delete-confirm">
              <Text variant="bodyStrong">Delete the draft “{b.name}”?</Text>
              <Text>
                Its {b.targets.length} targets and {b.rules.length} rules go with it. This cannot be undone.
              </Text>
              <View style={styles.actions}>
                <Button label="Delete it" variant="danger" compact loading={remove.isPending} onPress={doDelete} testID="baseline-delete-yes" />
                <Button label="Keep it" variant="ghost" compact onPress={() => setConfirming(null)} testID="baseline-delete-no" />
              </View>
            </View>
          ) : null}
          {release.isError ? <Notice message={errorMessage(release.error, SOFTWARE_ERROR_SENTENCES)} testID="baseline-release-error" /> : null}
          {remove.isError ? <Notice message={errorMessage(remove.error, SOFTWARE_ERROR_SENTENCES)} testID="baseline-delete-error" /> : null}
        </>
      )}
    </Card>
  );
}

// ---- The draft editor -----------------------------------------------------------------------

/** A target: empty for an ECU not in this baseline, else a version (semver, or any printable text compared for equality). */
const TargetFieldSchema = z.union([z.literal(''), SoftwareVersionSchema]);

const RuleFormSchema = z
  .object({
    whenEcuId: z.string().min(1, 'Choose the ECU the rule starts from.'),
    whenMinVersion: SemverSchema,
    thenEcuId: z.string().min(1, 'Choose the ECU the rule constrains.'),
    range: RangeSchema,
    note: z.string().trim().max(300, 'Use at most 300 characters.'),
  })
  .refine((r) => !r.whenEcuId || r.whenEcuId !== r.thenEcuId, { path: ['thenEcuId'], message: 'A rule links two different ECUs.' });

const EditorSchema = z.object({
  name: CreateBaselineSchema.shape.name,
  releaseLabel: z.string().trim().max(40, 'Use at most 40 characters.'),
  date: CreateBaselineSchema.shape.date,
  notes: z.string().trim().max(4000, 'Use at most 4000 characters.'),
  /** One entry per ECU of the catalogue, in its order. */
  targets: z.array(z.object({ ecuId: z.string(), version: z.string().trim().pipe(TargetFieldSchema) })),
  rules: z.array(RuleFormSchema).max(100, 'At most 100 rules in a baseline.'),
});
type EditorInput = z.input<typeof EditorSchema>;
type EditorOutput = z.output<typeof EditorSchema>;

function editorValues(baseline: Baseline, ecus: readonly Ecu[]): EditorInput {
  const versions = new Map(baseline.targets.map((t) => [t.ecuId, t.version]));
  return {
    name: baseline.name,
    releaseLabel: baseline.releaseLabel,
    date: baseline.date,
    notes: baseline.notes,
    targets: ecus.map((e) => ({ ecuId: e.id, version: versions.get(e.id) ?? '' })),
    rules: baseline.rules.map((r) => ({ whenEcuId: r.whenEcuId, whenMinVersion: r.whenMinVersion, thenEcuId: r.thenEcuId, range: r.range, note: r.note })),
  };
}

function updateBody(values: EditorOutput, version: number): UpdateBaseline {
  return {
    version,
    name: values.name,
    releaseLabel: values.releaseLabel,
    date: values.date,
    notes: values.notes,
    targets: values.targets.filter((t) => t.version !== '').map((t) => ({ ecuId: t.ecuId, version: t.version })),
    rules: values.rules,
  };
}

/**
 * Puts the server's field messages next to the editor's inputs: `rules.2.range` maps as it is;
 * `targets.1.version` counts only the targets sent (the ECUs with a version), so it is mapped back
 * to the ECU's row.
 */
function applyEditorErrors(error: unknown, values: EditorOutput, setError: UseFormSetError<EditorInput>): boolean {
  const fields = fieldErrors(error);
  const sent = values.targets.map((t, row) => ({ ...t, row })).filter((t) => t.version !== '');
  let applied = false;
  for (const [key, message] of Object.entries(fields)) {
    const target = /^targets\.(\d+)\.(ecuId|version)$/.exec(key);
    let name: string | null = null;
    if (target) {
      const row = sent[Number(target[1])]?.row;
      if (row !== undefined) name = `targets.${row}.version`;
    } else if (/^rules\.\d+\.(whenEcuId|whenMinVersion|thenEcuId|range|note)$/.test(key) || ['name', 'releaseLabel', 'date', 'notes'].includes(key)) {
      name = key;
    }
    if (name) {
      setError(name as FieldPath<EditorInput>, { type: 'server', message });
      applied = true;
    }
  }
  return applied;
}

function BaselineEditor({ baseline, programId, onDone }: { baseline: Baseline; programId: string; onDone: (message: string) => void }) {
  const ecus = useEcusQuery(programId);
  if (ecus.isPending) return <LoadingState label="Loading the ECUs…" />;
  if (ecus.isError || !ecus.data) return <ErrorState message={errorMessage(ecus.error)} onRetry={() => void ecus.refetch()} />;
  return <EditorForm baseline={baseline} ecus={ecus.data} onDone={onDone} />;
}

function EditorForm({ baseline, ecus, onDone }: { baseline: Baseline; ecus: Ecu[]; onDone: (message: string) => void }) {
  const update = useUpdateBaselineMutation(baseline.id);
  const [version, setVersion] = useState(baseline.version);
  const [conflict, setConflict] = useState<Baseline | null>(null);
  const [formError, setFormError] = useState<string | null>(null);
  const { control, handleSubmit, setError, reset } = useForm<EditorInput, unknown, EditorOutput>({
    resolver: zodResolver(EditorSchema),
    defaultValues: editorValues(baseline, ecus),
  });
  const rules = useFieldArray({ control, name: 'rules' });
  const options = ecus.map((e) => ({ value: e.id, label: e.code }));

  const send = async (values: EditorOutput, atVersion: number) => {
    setFormError(null);
    try {
      await update.mutateAsync(updateBody(values, atVersion));
      setConflict(null);
      onDone('Draft saved.');
    } catch (error) {
      const current = baselineConflictCurrent(error);
      if (current) {
        setConflict(current);
        return;
      }
      if (isApiError(error) && error.code === 'baseline/read-only') {
        onDone('');
        return;
      }
      if (!applyEditorErrors(error, values, setError)) setFormError(errorMessage(error, SOFTWARE_ERROR_SENTENCES));
    }
  };

  const onSubmit = handleSubmit((values) => send(values, version));
  const saveOverTheirs = handleSubmit((values) => {
    if (!conflict) return;
    setVersion(conflict.version);
    return send(values, conflict.version);
  });
  const loadTheirs = () => {
    if (!conflict) return;
    setVersion(conflict.version);
    reset(editorValues(conflict, ecus));
    setConflict(null);
  };

  return (
    <View style={styles.gap} testID="baseline-editor">
      {conflict ? (
        <View style={styles.conflictBox} accessibilityRole="alert" testID="baseline-conflict">
          <Text variant="bodyStrong">Someone else saved this draft while you were editing it.</Text>
          <Text>
            Theirs has {conflict.targets.length} targets and {conflict.rules.length} rules
            {conflict.updatedAt ? `, saved ${formatDay(conflict.updatedAt)}` : ''}. Save yours over theirs, or load theirs and drop your changes.
          </Text>
          <View style={styles.actions}>
            <Button label="Save mine over theirs" compact loading={update.isPending} onPress={() => void saveOverTheirs()} testID="baseline-conflict-mine" />
            <Button label="Load theirs" variant="secondary" compact onPress={loadTheirs} testID="baseline-conflict-theirs" />
          </View>
        </View>
      ) : null}
      <FormTextField control={control} name="name" label="Name" testID="baseline-edit-name" />
      <View style={styles.pair}>
        <View style={styles.grow}>
          <FormTextField control={control} name="releaseLabel" label="Release label (optional)" autoCapitalize="characters" testID="baseline-edit-label" />
        </View>
        <View style={styles.grow}>
          <Controller
            control={control}
            name="date"
            render={({ field, fieldState }) => (
              <DayField label="Date" value={field.value} onChange={field.onChange} error={fieldState.error?.message} testID="baseline-edit-date" />
            )}
          />
        </View>
      </View>
      <FormTextField control={control} name="notes" label="Notes (optional)" multiline numberOfLines={2} testID="baseline-edit-notes" />
      <Heading level={3} variant="bodyStrong">
        Targets
      </Heading>
      <Text tone="muted">Leave a version empty for an ECU this baseline does not set.</Text>
      {ecus.map((ecu, i) => (
        <TargetField key={ecu.id} control={control} index={i} ecu={ecu} />
      ))}
      <Heading level={3} variant="bodyStrong">
        Compatibility rules
      </Heading>
      <Text tone="muted">When the first ECU is at a version or later, the second must lie within a range (for example {'>=3.1.0 <4'}).</Text>
      {rules.fields.length === 0 ? <Text tone="muted">No rules.</Text> : null}
      {rules.fields.map((field, i) => (
        <Card key={field.id} tone="muted" style={styles.gap} testID={`baseline-rule-${i}`}>
          <Controller
            control={control}
            name={`rules.${i}.whenEcuId`}
            render={({ field: f, fieldState }) => (
              <Select label="When this ECU" value={f.value || null} onChange={f.onChange} options={options} error={fieldState.error?.message} testID={`baseline-rule-${i}-when`} />
            )}
          />
          <FormTextField
            control={control}
            name={`rules.${i}.whenMinVersion`}
            label="is at this version or later"
            autoCapitalize="none"
            autoCorrect={false}
            placeholder="4.2.0"
            testID={`baseline-rule-${i}-min`}
          />
          <Controller
            control={control}
            name={`rules.${i}.thenEcuId`}
            render={({ field: f, fieldState }) => (
              <Select label="then this ECU" value={f.value || null} onChange={f.onChange} options={options} error={fieldState.error?.message} testID={`baseline-rule-${i}-then`} />
            )}
          />
          <FormTextField
            control={control}
            name={`rules.${i}.range`}
            label="must lie within the range"
            autoCapitalize="none"
            autoCorrect={false}
            placeholder=">=3.1.0 <4"
            testID={`baseline-rule-${i}-range`}
          />
          <FormTextField control={control} name={`rules.${i}.note`} label="Note (optional)" testID={`baseline-rule-${i}-note`} />
          <View style={styles.actions}>
            <Button label="Remove this rule" variant="danger" compact onPress={() => rules.remove(i)} testID={`baseline-rule-${i}-remove`} />
          </View>
        </Card>
      ))}
      <View style={styles.actions}>
        <Button
          label="Add a rule"
          icon="plus"
          variant="secondary"
          compact
          onPress={() => rules.append({ whenEcuId: '', whenMinVersion: '', thenEcuId: '', range: '', note: '' })}
          testID="baseline-rule-add"
        />
      </View>
      {formError ? <Notice message={formError} testID="baseline-save-error" /> : null}
      <View style={styles.actions}>
        <Button label="Save the draft" compact loading={update.isPending} disabled={Boolean(conflict)} onPress={() => void onSubmit()} testID="baseline-save" />
        <Button label="Cancel" variant="ghost" compact onPress={() => onDone('')} testID="baseline-cancel" />
      </View>
    </View>
  );
}

/** One ECU's target; a version that is not semver is allowed and said to be compared only for equality. */
function TargetField({ control, index, ecu }: { control: Control<EditorInput, unknown, EditorOutput>; index: number; ecu: Ecu }) {
  const value = useWatch({ control, name: `targets.${index}.version` });
  const text = typeof value === 'string' ? value.trim() : '';
  const note = text ? versionProblem(text) : null;
  return (
    <FormTextField
      control={control}
      name={`targets.${index}.version`}
      label={`${ecu.code} · ${ecu.name}`}
      autoCapitalize="none"
      autoCorrect={false}
      hint={note ?? undefined}
      testID={`baseline-target-input-${ecu.code}`}
    />
  );
}

const CHANGE_WORDS = { added: 'Added', removed: 'Removed', upgraded: 'Upgraded', downgraded: 'Downgraded', changed: 'Changed', same: 'Same' } as const;

function DiffPanel({ baselines }: { baselines: BaselineSummary[] }) {
  const [fromId, setFromId] = useState<string | null>(null);
  const [toId, setToId] = useState<string | null>(null);
  const diff = useBaselineDiffQuery(fromId, toId);
  const options = baselines.map((b) => ({ value: b.id, label: `${b.name}${b.releaseLabel ? ` · ${b.releaseLabel}` : ''}` }));
  return (
    <Card style={styles.gap} testID="baseline-diff">
      <Heading level={2} variant="heading">
        Compare two baselines
      </Heading>
      <Select label="From" value={fromId} onChange={setFromId} options={options} testID="baseline-diff-from" />
      <Select label="To" value={toId} onChange={setToId} options={options} testID="baseline-diff-to" />
      {fromId && fromId === toId ? <Text tone="muted">Choose two different baselines.</Text> : null}
      {diff.isFetching && !diff.data ? <LoadingState label="Comparing…" /> : null}
      {diff.isError ? <Notice message={errorMessage(diff.error)} /> : null}
      {diff.data ? (
        <View style={styles.gap}>
          {diff.data.targets.map((t) => (
            <View key={t.ecuId} style={styles.line} testID={`diff-target-${t.ecuCode}`}>
              <Text variant="label" style={styles.code}>
                {t.ecuCode}
              </Text>
              <Text style={styles.flex}>
                {t.from ?? '—'} → {t.to ?? '—'}
              </Text>
              <Badge label={CHANGE_WORDS[t.change]} tone={t.change === 'same' ? 'neutral' : t.change === 'downgraded' || t.change === 'removed' ? 'warning' : 'primary'} />
            </View>
          ))}
          {diff.data.rules
            .filter((r) => r.change !== 'same')
            .map((r, i) => {
              const rule = r.to ?? r.from;
              return rule ? (
                <Text key={i}>
                  Rule {r.change}: when {rule.whenEcuCode} ≥ {rule.whenMinVersion}, {rule.thenEcuCode} {rule.range}
                  {r.change === 'changed' && r.from ? ` (was ${r.from.range})` : ''}
                </Text>
              ) : null;
            })}
        </View>
      ) : null}
    </Card>
  );
}

const styles = StyleSheet.create({
  gap: {
    gap: spacing.sm,
  },
  columns: {
    flexDirection: 'row',
    gap: spacing.xl,
    alignItems: 'flex-start',
  },
  column: {
    flex: 1,
    gap: spacing.md,
  },
  summary: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    alignItems: 'center',
    gap: spacing.sm,
  },
  open: {
    borderColor: colors.primary,
  },
  flex: {
    flex: 1,
  },
  line: {
    flexDirection: 'row',
    alignItems: 'center',
    gap: spacing.sm,
    borderBottomWidth: 1,
    borderBottomColor: colors.border,
    paddingVertical: spacing.xs,
  },
  code: {
    width: 56,
  },
  actions: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.sm,
  },
  pair: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.md,
  },
  grow: {
    flexGrow: 1,
    flexBasis: 180,
  },
  confirm: {
    gap: spacing.sm,
    padding: spacing.md,
    borderRadius: radii.md,
    borderWidth: 1,
    borderColor: colors.warning,
    backgroundColor: colors.warningTint,
  },
  conflictBox: {
    gap: spacing.sm,
    padding: spacing.md,
    borderRadius: radii.md,
    borderWidth: 1,
    borderColor: colors.warning,
    backgroundColor: colors.warningTint,
  },
});
