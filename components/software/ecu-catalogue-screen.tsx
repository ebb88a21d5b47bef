import { zodResolver } from '@hookform/resolvers/zod';
import { useState, type ReactNode } from 'react';
import { Controller, useForm } from 'react-hook-form';
import { StyleSheet, View } from 'react-native';
import { FormTextField } from '@/components/form/form-text-field';
import { applyServerFieldErrors } from '@/components/form/server-errors';
import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { Select } from '@/components/ui/select';
import { Screen } from '@/components/ui/screen';
import { EmptyState, ErrorState, LoadingState, Notice } from '@/components/ui/states';
import { Heading, Text } from '@/components/ui/text';
import { colors, radii, spacing } from '@/components/theme/tokens';
import { errorMessage } from '@/hooks/api/api-client';
import { ecuConflictCurrent, useCreateEcuMutation, useEcusQuery, useUpdateEcuMutation } from '@/hooks/queries/software';
import { useStagesQuery } from '@/hooks/queries/stages';
import { useBreakpoints } from '@/hooks/use-breakpoints';
import { useSession } from '@/hooks/use-session';
import { SOFTWARE_ERROR_SENTENCES } from '@/shared/api/software-paths';
import { ASSET_KINDS, ASSET_KIND_LABELS, type AssetKind, type Stage } from '@/shared/schemas/assets';
import { CreateEcuSchema, type Ecu, type UpdateEcu } from '@/shared/schemas/software';
import type { z } from 'zod';
import { SoftwareHeader } from './software-header';
import { softwareCan } from './software-words';

// The program's ECU catalogue (PRODUCT.md section 3D): engineers and leads keep it; everyone else
// reads it. Which asset kinds and stages carry an ECU decides where the matrix and the reflash
// list expect it.

const EcuFormSchema = CreateEcuSchema.omit({ programId: true });
type EcuFormInput = z.input<typeof EcuFormSchema>;
type EcuFormOutput = z.output<typeof EcuFormSchema>;

const FIELDS = ['name', 'code', 'supplier', 'assetKinds', 'stageIds', 'notes'] as const;
type Field = (typeof FIELDS)[number];

const FIELD_LABELS: Record<Field, string> = {
  name: 'Name',
  code: 'Short code',
  supplier: 'Supplier',
  assetKinds: 'Carried by',
  stageIds: 'Stages',
  notes: 'Notes',
};

const KIND_OPTIONS = ASSET_KINDS.map((kind) => ({ value: kind, label: ASSET_KIND_LABELS[kind] }));

function formValues(ecu: Ecu | null): EcuFormInput {
  return {
    name: ecu?.name ?? '',
    code: ecu?.code ?? '',
    supplier: ecu?.supplier ?? '',
    assetKinds: ecu?.assetKinds ?? ['vehicle'],
    stageIds: ecu?.stageIds ?? [],
    notes: ecu?.notes ?? '',
  };
}

const sameValue = (a: unknown, b: unknown) => JSON.stringify(a) === JSON.stringify(b);
const sortedIds = (ids: readonly string[]) => [...ids].sort();

/** Only the fields the user changed go to the server: someone else's edits to the others stay. */
function changedFields(base: Ecu, draft: EcuFormOutput): Omit<UpdateEcu, 'version'> {
  const out: Record<string, unknown> = {};
  for (const field of FIELDS) {
    const before = field === 'assetKinds' || field === 'stageIds' ? sortedIds(base[field]) : base[field];
    const after = field === 'assetKinds' || field === 'stageIds' ? sortedIds(draft[field]) : draft[field];
    if (!sameValue(before, after)) out[field] = draft[field];
  }
  return out as Omit<UpdateEcu, 'version'>;
}

function kindsText(kinds: readonly AssetKind[]): string {
  return kinds.map((k) => ASSET_KIND_LABELS[k]).join(', ');
}

function stagesText(stageIds: readonly string[], stages: readonly Stage[]): string {
  if (stageIds.length === 0) return 'Every stage';
  const names = new Map(stages.map((s) => [s.id, s.name]));
  return stageIds.map((id) => names.get(id) ?? 'a removed stage').join(', ');
}

/** Words for one field's value, for the list of changes in a conflict. */
function valueText(field: Field, ecu: Pick<Ecu, Field>, stages: readonly Stage[]): string {
  if (field === 'assetKinds') return kindsText(ecu.assetKinds);
  if (field === 'stageIds') return stagesText(ecu.stageIds, stages);
  return ecu[field] || '(empty)';
}

export function EcuCatalogueScreen() {
  const { user, currentProgramId } = useSession();
  const { isWide } = useBreakpoints();
  const ecus = useEcusQuery(currentProgramId);
  const stages = useStagesQuery(currentProgramId);
  const canEdit = softwareCan.editCatalogue(user?.role);
  /** The ECU being edited, 'new' for the add form, or null. */
  const [editing, setEditing] = useState<string | null>(null);
  const [notice, setNotice] = useState<string | null>(null);
  const stageList = stages.data ?? [];
  const list = ecus.data ?? [];

  const done = (message: string) => {
    setEditing(null);
    setNotice(message || null);
  };

  const formFor = (ecu: Ecu | null) =>
    currentProgramId ? (
      <EcuForm key={ecu?.id ?? 'new'} programId={currentProgramId} ecu={ecu} stages={stageList} wide={isWide} onDone={done} />
    ) : null;

  return (
    <Screen testID="ecu-catalogue-screen">
      <SoftwareHeader place="ecus" title="ECU catalogue" />
      <Text tone="muted">
        The ECUs of the program and the assets that carry them. The matrix, the baselines and the reflash list expect an ECU only on the
        kinds of asset and the stages listed here.
      </Text>
      {!canEdit ? (
        <Text tone="muted" testID="ecu-read-only">
          Integration engineers and program leads keep the catalogue; you can read it.
        </Text>
      ) : null}
      {notice ? <Notice tone="success" message={notice} testID="ecu-notice" /> : null}
      {canEdit && editing !== 'new' ? (
        <View style={styles.actions}>
          <Button
            label="Add an ECU"
            icon="plus"
            compact
            onPress={() => {
              setNotice(null);
              setEditing('new');
            }}
            testID="ecu-add"
          />
        </View>
      ) : null}
      {editing === 'new' ? formFor(null) : null}
      {ecus.isPending && currentProgramId ? <LoadingState label="Loading the catalogue…" /> : null}
      {ecus.isError ? <ErrorState message={errorMessage(ecus.error)} onRetry={() => void ecus.refetch()} retrying={ecus.isFetching} /> : null}
      {ecus.data && list.length === 0 ? (
        <EmptyState title="No ECUs yet" message={canEdit ? 'Add the first ECU of the program.' : 'An integration engineer adds them.'} />
      ) : null}
      {list.length > 0 ? (
        <Text tone="muted" testID="ecu-total">
          {list.length === 1 ? '1 ECU' : `${list.length} ECUs`}
        </Text>
      ) : null}
      {list.length > 0 && isWide ? (
        <EcuTable
          ecus={list}
          stages={stageList}
          canEdit={canEdit}
          editing={editing}
          onEdit={(id) => {
            setNotice(null);
            setEditing(id);
          }}
          renderForm={formFor}
        />
      ) : null}
      {list.length > 0 && !isWide ? (
        <View style={styles.list} testID="ecu-list">
          {list.map((ecu) =>
            editing === ecu.id ? (
              <View key={ecu.id}>{formFor(ecu)}</View>
            ) : (
              <EcuCard
                key={ecu.id}
                ecu={ecu}
                stages={stageList}
                canEdit={canEdit}
                onEdit={() => {
                  setNotice(null);
                  setEditing(ecu.id);
                }}
              />
            ),
          )}
        </View>
      ) : null}
    </Screen>
  );
}

function EcuCard({ ecu, stages, canEdit, onEdit }: { ecu: Ecu; stages: readonly Stage[]; canEdit: boolean; onEdit: () => void }) {
  return (
    <Card style={styles.card} testID={`ecu-row-${ecu.code}`}>
      <View style={styles.cardHead}>
        <Heading level={2} variant="heading">
          {ecu.code}
        </Heading>
        <Text variant="bodyStrong" style={styles.flex}>
          {ecu.name}
        </Text>
      </View>
      <Text tone="muted">{ecu.supplier ? `Supplier: ${ecu.supplier}` : 'No supplier recorded'}</Text>
      <Text>
        <Text weight="semibold">Carried by:</Text> {kindsText(ecu.assetKinds)}
      </Text>
      <Text>
        <Text weight="semibold">Stages:</Text> {stagesText(ecu.stageIds, stages)}
      </Text>
      {ecu.notes ? <Text tone="muted">{ecu.notes}</Text> : null}
      {canEdit ? (
        <View style={styles.actions}>
          <Button label="Edit" variant="secondary" compact onPress={onEdit} accessibilityLabel={`Edit ${ecu.code}, ${ecu.name}`} testID={`ecu-edit-${ecu.code}`} />
        </View>
      ) : null}
    </Card>
  );
}

const COLUMNS: ReadonlyArray<{ key: string; label: string; flex: number }> = [
  { key: 'code', label: 'Code', flex: 0.8 },
  { key: 'name', label: 'Name', flex: 2 },
  { key: 'supplier', label: 'Supplier', flex: 1.4 },
  { key: 'kinds', label: 'Carried by', flex: 1.4 },
  { key: 'stages', label: 'Stages', flex: 1.8 },
  { key: 'notes', label: 'Notes', flex: 2.2 },
];

function EcuTable({
  ecus,
  stages,
  canEdit,
  editing,
  onEdit,
  renderForm,
}: {
  ecus: readonly Ecu[];
  stages: readonly Stage[];
  canEdit: boolean;
  editing: string | null;
  onEdit: (id: string) => void;
  renderForm: (ecu: Ecu) => ReactNode;
}) {
  return (
    <View style={styles.table} role="table" aria-label="ECU catalogue" testID="ecu-table">
      <View style={[styles.row, styles.headerRow]} role="row">
        {COLUMNS.map((c) => (
          <View key={c.key} style={[styles.cell, { flex: c.flex }]} role="columnheader">
            <Text variant="label" tone="muted">
              {c.label}
            </Text>
          </View>
        ))}
        {canEdit ? <View style={styles.actionCell} role="columnheader" aria-label="Actions" /> : null}
      </View>
      {ecus.map((ecu) => (
        <View key={ecu.id}>
          <View style={[styles.row, editing === ecu.id && styles.rowEditing]} role="row" testID={`ecu-row-${ecu.code}`}>
            <View style={[styles.cell, { flex: 0.8 }]} role="rowheader">
              <Text variant="bodyStrong">{ecu.code}</Text>
            </View>
            <View style={[styles.cell, { flex: 2 }]} role="cell">
              <Text>{ecu.name}</Text>
            </View>
            <View style={[styles.cell, { flex: 1.4 }]} role="cell">
              <Text tone={ecu.supplier ? 'default' : 'muted'}>{ecu.supplier || '—'}</Text>
            </View>
            <View style={[styles.cell, { flex: 1.4 }]} role="cell">
              <Text>{kindsText(ecu.assetKinds)}</Text>
            </View>
            <View style={[styles.cell, { flex: 1.8 }]} role="cell">
              <Text>{stagesText(ecu.stageIds, stages)}</Text>
            </View>
            <View style={[styles.cell, { flex: 2.2 }]} role="cell">
              <Text tone="muted" numberOfLines={3}>
                {ecu.notes || '—'}
              </Text>
            </View>
            {canEdit ? (
              <View style={styles.actionCell} role="cell">
                {editing === ecu.id ? (
                  <Text variant="caption" tone="muted">
                    Editing
                  </Text>
                ) : (
                  <Button
                    label="Edit"
                    variant="secondary"
                    compact
                    onPress={() => onEdit(ecu.id)}
                    accessibilityLabel={`Edit ${ecu.code}, ${ecu.name}`}
                    testID={`ecu-edit-${ecu.code}`}
                  />
                )}
              </View>
            ) : null}
          </View>
          {editing === ecu.id ? <View style={styles.inlineForm}>{renderForm(ecu)}</View> : null}
        </View>
      ))}
    </View>
  );
}

type Conflict = { current: Ecu; mine: Omit<UpdateEcu, 'version'> };

/** Adds an ECU, or edits one with its version: when someone saved it first (409), their changes and the user's show side by side. */
function EcuForm({
  programId,
  ecu,
  stages,
  wide,
  onDone,
}: {
  programId: string;
  ecu: Ecu | null;
  stages: readonly Stage[];
  wide: boolean;
  onDone: (message: string) => void;
}) {
  const create = useCreateEcuMutation();
  const update = useUpdateEcuMutation(programId);
  const [base, setBase] = useState<Ecu | null>(ecu);
  const [conflict, setConflict] = useState<Conflict | null>(null);
  const [formError, setFormError] = useState<string | null>(null);
  const { control, handleSubmit, setError, reset } = useForm<EcuFormInput, unknown, EcuFormOutput>({
    resolver: zodResolver(EcuFormSchema),
    defaultValues: formValues(ecu),
  });
  const tid = ecu ? `ecu-form-${ecu.code}` : 'ecu-form';
  const stageOptions = stages
    .filter((s) => !s.retired || ecu?.stageIds.includes(s.id))
    .map((s) => ({ value: s.id, label: s.retired ? `${s.name} (retired)` : s.name }));

  const fail = (error: unknown) => {
    if (!applyServerFieldErrors(error, setError, FIELDS)) setFormError(errorMessage(error, SOFTWARE_ERROR_SENTENCES));
  };

  const send = async (current: Ecu, change: Omit<UpdateEcu, 'version'>) => {
    setFormError(null);
    if (Object.keys(change).length === 0) {
      onDone('Nothing was changed.');
      return;
    }
    try {
      const saved = await update.mutateAsync({ id: current.id, ...change, version: current.version });
      setConflict(null);
      onDone(`${saved.code} saved.`);
    } catch (error) {
      const theirs = ecuConflictCurrent(error);
      if (theirs) {
        setConflict({ current: theirs, mine: change });
        return;
      }
      fail(error);
    }
  };

  const onSubmit = handleSubmit(async (values) => {
    setFormError(null);
    if (base) {
      await send(base, changedFields(base, values));
      return;
    }
    try {
      const created = await create.mutateAsync({ programId, ...values });
      onDone(`${created.code} added to the catalogue.`);
    } catch (error) {
      fail(error);
    }
  });

  const keepTheirs = () => {
    if (!conflict) return;
    setBase(conflict.current);
    reset(formValues(conflict.current));
    setConflict(null);
  };

  const reapplyMine = () => {
    if (!conflict) return;
    setBase(conflict.current);
    void send(conflict.current, conflict.mine);
  };

  const theirChanges = conflict && base ? FIELDS.filter((f) => !sameValue(base[f], conflict.current[f])) : [];
  const myChanges = conflict ? FIELDS.filter((f) => f in conflict.mine) : [];

  return (
    <Card style={styles.form} testID={tid}>
      <Heading level={2} variant="heading">
        {ecu ? `Edit ${ecu.code}` : 'Add an ECU'}
      </Heading>
      {conflict && base ? (
        <View style={styles.conflict} accessibilityRole="alert" testID="ecu-conflict">
          <Text variant="bodyStrong">Someone else saved this ECU while you were editing it.</Text>
          <Text variant="label">Their changes</Text>
          {theirChanges.length === 0 ? <Text tone="muted">None you can see here.</Text> : null}
          {theirChanges.map((f) => (
            <Text key={f}>
              <Text weight="semibold">{FIELD_LABELS[f]}:</Text> {valueText(f, base, stages)} → {valueText(f, conflict.current, stages)}
            </Text>
          ))}
          <Text variant="label">Your changes, not saved yet</Text>
          {myChanges.map((f) => (
            <Text key={f}>
              <Text weight="semibold">{FIELD_LABELS[f]}:</Text> {valueText(f, { ...base, ...conflict.mine } as Ecu, stages)}
            </Text>
          ))}
          <View style={styles.actions}>
            <Button label="Re-apply my changes" compact loading={update.isPending} onPress={reapplyMine} testID="ecu-conflict-reapply" />
            <Button label="Keep theirs" variant="secondary" compact onPress={keepTheirs} testID="ecu-conflict-discard" />
          </View>
        </View>
      ) : null}
      <View style={wide ? styles.pairWide : styles.pair}>
        <View style={styles.grow}>
          <FormTextField control={control} name="name" label="Name" placeholder="Front zone controller" testID={`${tid}-name`} />
        </View>
        <View style={styles.grow}>
          <FormTextField
            control={control}
            name="code"
            label="Short code"
            hint="2 to 12 capital letters or digits, unique in the program."
            autoCapitalize="characters"
            autoCorrect={false}
            placeholder="FZC"
            testID={`${tid}-code`}
          />
        </View>
        <View style={styles.grow}>
          <FormTextField control={control} name="supplier" label="Supplier (optional)" testID={`${tid}-supplier`} />
        </View>
      </View>
      <Controller
        control={control}
        name="assetKinds"
        render={({ field, fieldState }) => (
          <Select
            multiple
            label="Carried by"
            options={KIND_OPTIONS}
            value={field.value ?? []}
            onChange={field.onChange}
            error={fieldState.error?.message}
            testID={`${tid}-kinds`}
          />
        )}
      />
      <Controller
        control={control}
        name="stageIds"
        render={({ field, fieldState }) => (
          <Select
            multiple
            label="Stages that carry it"
            hint={(field.value ?? []).length === 0 ? 'None chosen: every stage carries it.' : undefined}
            options={stageOptions}
            value={field.value ?? []}
            onChange={field.onChange}
            error={fieldState.error?.message}
            testID={`${tid}-stages`}
          />
        )}
      />
      <FormTextField control={control} name="notes" label="Notes (optional)" multiline numberOfLines={3} testID={`${tid}-notes`} />
      {formError ? <Notice message={formError} testID={`${tid}-error`} /> : null}
      <View style={styles.actions}>
        <Button
          label={ecu ? 'Save the ECU' : 'Add the ECU'}
          compact
          loading={create.isPending || update.isPending}
          disabled={Boolean(conflict)}
          onPress={() => void onSubmit()}
          testID={`${tid}-save`}
        />
        <Button label="Cancel" variant="ghost" compact onPress={() => onDone('')} testID={`${tid}-cancel`} />
      </View>
    </Card>
  );
}

const styles = StyleSheet.create({
  list: {
    gap: spacing.md,
  },
  card: {
    gap: spacing.xs,
  },
  cardHead: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    alignItems: 'baseline',
    gap: spacing.sm,
  },
  flex: {
    flex: 1,
  },
  actions: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.sm,
  },
  table: {
    borderWidth: 1,
    borderColor: colors.border,
    borderRadius: radii.md,
    backgroundColor: colors.surface,
    overflow: 'hidden',
  },
  row: {
    flexDirection: 'row',
    alignItems: 'center',
    borderBottomWidth: 1,
    borderBottomColor: colors.border,
    minHeight: 56,
  },
  rowEditing: {
    backgroundColor: colors.surfaceMuted,
  },
  headerRow: {
    backgroundColor: colors.surfaceMuted,
    minHeight: 40,
  },
  cell: {
    paddingHorizontal: spacing.md,
    paddingVertical: spacing.sm,
  },
  actionCell: {
    width: 96,
    paddingHorizontal: spacing.sm,
    alignItems: 'flex-end',
  },
  inlineForm: {
    padding: spacing.md,
    borderBottomWidth: 1,
    borderBottomColor: colors.border,
    backgroundColor: colors.surfaceMuted,
  },
  form: {
    gap: spacing.md,
  },
  pair: {
    gap: spacing.md,
  },
  pairWide: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.md,
  },
  grow: {
    flexGrow: 1,
    flexBasis: 200,
  },
  conflict: {
    gap: spacing.sm,
    padding: spacing.md,
    borderRadius: radii.md,
    borderWidth: 1,
    borderColor: colors.warning,
    backgroundColor: colors.warningTint,
  },
});
