import { zodResolver } from '@hookform/resolvers/zod';
import { useMemo, useState } from 'react';
import { Controller, useForm } from 'react-hook-form';
import { StyleSheet, View } from 'react-native';
import { FormTextField } from '@/components/form/form-text-field';
import { applyServerFieldErrors } from '@/components/form/server-errors';
import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { Select, type SelectOption } from '@/components/ui/select';
import { Notice } from '@/components/ui/states';
import { Heading, Text } from '@/components/ui/text';
import { colors, radii, spacing } from '@/components/theme/tokens';
import { errorMessage } from '@/hooks/api/api-client';
import { findingConflictCurrent, useProgramPeopleQuery, useUpdateFindingMutation } from '@/hooks/queries/findings';
import { FINDING_ERROR_SENTENCES } from '@/shared/api/finding-paths';
import { SYSTEM_LABELS, SYSTEMS, type System } from '@/shared/schemas/assets';
import type { Finding, FindingSeverity, Person, UpdateFinding } from '@/shared/schemas/findings';
import { DueDateField } from './due-date-field';
import { SafetyCaution } from './finding-badges';
import { FindingFormSchema, type FindingFormInput, type FindingFormValues } from './finding-form-schema';
import { findingChanges, snapshotOf, type FieldChange, type FindingSnapshot } from './finding-history-words';
import { SeverityChoice } from './severity-choice';

const DETAIL_KEYS = ['title', 'description', 'severity', 'system', 'owner', 'dueDate', 'watchers'] as const;
const FIELDS = ['title', 'severity', 'description', 'system', 'ownerId', 'dueDate', 'watcherIds'] as const;
const SYSTEM_OPTIONS: SelectOption<System>[] = SYSTEMS.map((system) => ({ value: system, label: SYSTEM_LABELS[system] }));

export function formValuesOf(finding: Finding): FindingFormInput {
  return {
    title: finding.title,
    severity: finding.severity,
    description: finding.description,
    system: finding.system,
    ownerId: finding.owner?.id ?? null,
    dueDate: finding.dueDate ?? '',
    watcherIds: finding.watchers.map((person) => person.id),
  };
}

const sameIds = (a: readonly string[], b: readonly string[]) => a.length === b.length && [...a].sort().join() === [...b].sort().join();

/** Only what the person changed against the finding they started from: a PATCH never carries untouched fields. */
export function changedFields(base: Finding, values: FindingFormValues): Omit<UpdateFinding, 'version'> {
  const body: Omit<UpdateFinding, 'version'> = {};
  if (values.title !== base.title) body.title = values.title;
  if (values.description !== base.description) body.description = values.description;
  if (values.severity && values.severity !== base.severity) body.severity = values.severity as FindingSeverity;
  if ((values.system ?? null) !== base.system) body.system = values.system ?? null;
  if ((values.ownerId ?? null) !== (base.owner?.id ?? null)) body.ownerId = values.ownerId ?? null;
  if ((values.dueDate || null) !== base.dueDate) body.dueDate = values.dueDate || null;
  const watchers = base.watchers.map((person) => person.id);
  if (!sameIds(values.watcherIds, watchers)) body.watcherIds = values.watcherIds;
  return body;
}

/** The same change as a snapshot, to compare with what someone else saved. */
function snapshotOfChanges(base: Finding, body: Omit<UpdateFinding, 'version'>, people: ReadonlyMap<string, Person>): FindingSnapshot {
  const person = (id: string): Person => people.get(id) ?? { id, name: 'someone' };
  return {
    ...snapshotOf(base),
    ...(body.title !== undefined ? { title: body.title } : {}),
    ...(body.description !== undefined ? { description: body.description } : {}),
    ...(body.severity !== undefined ? { severity: body.severity } : {}),
    ...(body.system !== undefined ? { system: body.system } : {}),
    ...(body.ownerId !== undefined ? { owner: body.ownerId ? person(body.ownerId) : null } : {}),
    ...(body.dueDate !== undefined ? { dueDate: body.dueDate } : {}),
    ...(body.watcherIds !== undefined ? { watchers: body.watcherIds.map(person) } : {}),
  };
}

/** A PATCH body as form values, to lay over the latest copy after a conflict. */
function formChanges(body: Omit<UpdateFinding, 'version'>): Partial<FindingFormInput> {
  return {
    ...(body.title !== undefined ? { title: body.title } : {}),
    ...(body.description !== undefined ? { description: body.description } : {}),
    ...(body.severity !== undefined ? { severity: body.severity } : {}),
    ...(body.system !== undefined ? { system: body.system } : {}),
    ...(body.ownerId !== undefined ? { ownerId: body.ownerId } : {}),
    ...(body.dueDate !== undefined ? { dueDate: body.dueDate ?? '' } : {}),
    ...(body.watcherIds !== undefined ? { watcherIds: body.watcherIds } : {}),
  };
}

type Conflict = { current: Finding; theirs: FieldChange[]; mine: FieldChange[]; body: Omit<UpdateFinding, 'version'> };

/**
 * Edits the details with the version the page showed. When someone saved first (409), it shows
 * their changes beside this person's, and saves nothing until the person re-applies theirs on
 * top of the latest or drops them.
 */
export function FindingEditForm({ finding, me, onDone }: { finding: Finding; me: Person | null; onDone: (message: string) => void }) {
  const [base, setBase] = useState(finding);
  const [conflict, setConflict] = useState<Conflict | null>(null);
  const [formError, setFormError] = useState<string | null>(null);
  const update = useUpdateFindingMutation(finding.id);
  const people = useProgramPeopleQuery(finding.programId);

  const peopleById = useMemo(() => {
    const map = new Map<string, Person>();
    for (const person of [me, finding.owner, base.owner, ...finding.watchers, ...base.watchers, ...(people.data ?? [])]) {
      if (person) map.set(person.id, person);
    }
    return map;
  }, [me, finding, base, people.data]);
  const options: SelectOption<string>[] = [...peopleById.values()]
    .sort((a, b) => (a.id === me?.id ? -1 : b.id === me?.id ? 1 : a.name.localeCompare(b.name)))
    .map((person) => ({ value: person.id, label: person.id === me?.id ? `Me (${person.name})` : person.name }));

  const { control, handleSubmit, setError, watch, reset } = useForm({
    resolver: zodResolver(FindingFormSchema),
    defaultValues: formValuesOf(finding),
  });
  const severity = watch('severity');

  const save = (body: Omit<UpdateFinding, 'version'>, startedFrom: Finding) => {
    setFormError(null);
    update.mutate(
      { version: startedFrom.version, ...body },
      {
        onSuccess: () => onDone('Saved.'),
        onError: (error) => {
          const current = findingConflictCurrent(error);
          if (current) {
            setConflict({
              current,
              theirs: findingChanges(snapshotOf(startedFrom), snapshotOf(current), DETAIL_KEYS),
              mine: findingChanges(snapshotOf(startedFrom), snapshotOfChanges(startedFrom, body, peopleById), DETAIL_KEYS),
              body,
            });
            // The form now reads the latest with this person's edit over it, so saving again changes only what they changed.
            reset({ ...formValuesOf(current), ...formChanges(body) });
            setBase(current);
            return;
          }
          if (!applyServerFieldErrors(error, setError, FIELDS)) setFormError(errorMessage(error, FINDING_ERROR_SENTENCES));
        },
      },
    );
  };

  const onSubmit = handleSubmit((values) => {
    const body = changedFields(base, values);
    setConflict(null);
    if (Object.keys(body).length === 0) {
      onDone('');
      return;
    }
    save(body, base);
  });

  return (
    <Card testID="finding-edit">
      <Heading level={2} variant="heading">
        Edit the details
      </Heading>
      {conflict ? (
        <ConflictPanel
          conflict={conflict}
          onReapply={() => void onSubmit()}
          onDiscard={() => onDone('Your edit was dropped; the page shows the latest.')}
          busy={update.isPending}
        />
      ) : null}
      <FormTextField control={control} name="title" label="Title" testID="finding-edit-title" />
      <FormTextField control={control} name="description" label="Description" multiline numberOfLines={4} testID="finding-edit-description" />
      <Controller
        control={control}
        name="severity"
        render={({ field, fieldState }) => <SeverityChoice label="Severity" value={field.value} onChange={field.onChange} error={fieldState.error?.message} />}
      />
      {severity === 'safety' && base.severity !== 'safety' ? <SafetyCaution /> : null}
      <Controller
        control={control}
        name="system"
        render={({ field }) => (
          <Select
            label="System"
            options={SYSTEM_OPTIONS}
            value={field.value}
            onChange={(value) => field.onChange(field.value === value ? null : value)}
            testID="finding-edit-system"
          />
        )}
      />
      <Controller
        control={control}
        name="ownerId"
        render={({ field, fieldState }) => (
          <Select
            label="Owner"
            options={options}
            value={field.value}
            onChange={(value) => field.onChange(field.value === value ? null : value)}
            error={fieldState.error?.message}
            hint="Press the chosen name again to leave it unassigned."
            testID="finding-edit-owner"
          />
        )}
      />
      <Controller
        control={control}
        name="dueDate"
        render={({ field, fieldState }) => (
          <DueDateField value={field.value ?? ''} onChange={field.onChange} error={fieldState.error?.message} testID="finding-edit-due" />
        )}
      />
      <Controller
        control={control}
        name="watcherIds"
        render={({ field, fieldState }) => (
          <Select multiple label="Watchers" options={options} value={field.value ?? []} onChange={field.onChange} error={fieldState.error?.message} testID="finding-edit-watchers" />
        )}
      />
      {formError ? <Notice message={formError} testID="finding-edit-error" /> : null}
      {conflict ? null : (
        <View style={styles.actions}>
          <Button label="Save" loading={update.isPending} onPress={() => void onSubmit()} testID="finding-edit-save" />
          <Button label="Cancel" variant="ghost" onPress={() => onDone('')} testID="finding-edit-cancel" />
        </View>
      )}
    </Card>
  );
}

function ChangeList({ changes, testID }: { changes: FieldChange[]; testID: string }) {
  if (changes.length === 0) return <Text tone="muted">No change to these details.</Text>;
  return (
    <View style={styles.changes} testID={testID}>
      {changes.map((change) => (
        <Text key={change.key}>
          <Text weight="semibold">{change.label}:</Text> {change.before} → {change.after}
        </Text>
      ))}
    </View>
  );
}

function ConflictPanel({ conflict, onReapply, onDiscard, busy }: { conflict: Conflict; onReapply: () => void; onDiscard: () => void; busy: boolean }) {
  const both = conflict.mine.filter((mine) => conflict.theirs.some((theirs) => theirs.key === mine.key)).map((change) => change.label.toLowerCase());
  const statusMoved = conflict.theirs.length === 0;
  return (
    <View style={styles.conflict} accessibilityRole="alert" testID="finding-conflict">
      <Text variant="bodyStrong" tone="warning">
        Someone else saved this finding while you were editing. Nothing of yours was saved yet.
      </Text>
      <Text variant="label">What they changed</Text>
      {statusMoved ? <Text tone="muted">Only its status, comments or photos changed.</Text> : <ChangeList changes={conflict.theirs} testID="finding-conflict-theirs" />}
      <Text variant="label">Your edit</Text>
      <ChangeList changes={conflict.mine} testID="finding-conflict-mine" />
      {both.length ? (
        <Text tone="warning" testID="finding-conflict-both">
          You both changed the {both.join(', ')}: applying yours replaces theirs.
        </Text>
      ) : null}
      <View style={styles.actions}>
        <Button label="Apply my edit on top" loading={busy} onPress={onReapply} testID="finding-conflict-apply" />
        <Button label="Drop my edit" variant="secondary" onPress={onDiscard} testID="finding-conflict-discard" />
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  actions: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.sm,
  },
  changes: {
    gap: spacing.xxs,
  },
  conflict: {
    gap: spacing.sm,
    padding: spacing.md,
    borderRadius: radii.md,
    borderWidth: 2,
    borderColor: colors.warning,
    backgroundColor: colors.warningTint,
  },
});
