import { zodResolver } from '@hookform/resolvers/zod';
import { useState } from 'react';
import { Controller, useForm } from 'react-hook-form';
import { StyleSheet, View } from 'react-native';
import type { z } from 'zod';
import { can } from '@/components/assets/permissions';
import { FormTextField } from '@/components/form/form-text-field';
import { applyServerFieldErrors } from '@/components/form/server-errors';
import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { Checkbox } from '@/components/ui/checkbox';
import { Badge } from '@/components/ui/chip';
import { PageTitle } from '@/components/ui/page-title';
import { Screen } from '@/components/ui/screen';
import { Select } from '@/components/ui/select';
import { EmptyState, ErrorState, LoadingState, Notice } from '@/components/ui/states';
import { Heading, Text } from '@/components/ui/text';
import { TextLink } from '@/components/ui/text-link';
import { colors, spacing } from '@/components/theme/tokens';
import { errorMessage, isApiError } from '@/hooks/api/api-client';
import { useAddTemplateItemMutation, useStageTemplateQuery, useStagesQuery, useUpdateTemplateItemMutation } from '@/hooks/queries/stages';
import { useSession } from '@/hooks/use-session';
import { SYSTEMS, SYSTEM_LABELS, TemplateItemInputSchema, type TemplateItem } from '@/shared/schemas/assets';

type ItemInput = z.input<typeof TemplateItemInputSchema>;
type ItemOutput = z.output<typeof TemplateItemInputSchema>;

const SYSTEM_OPTIONS = SYSTEMS.map((value) => ({ value, label: SYSTEM_LABELS[value] }));
const FIELDS = ['system', 'title', 'instructions', 'expectedPartNumber', 'expectedRevision', 'requiredForGate', 'hvQualified'] as const;
export const TEMPLATE_NOTE = 'Changes apply to checklists created afterwards.';

/** A stage's checklist template, grouped by system; engineers and leads add, edit and retire items. */
export function TemplateScreen({ stageId }: { stageId: string }) {
  const { user, currentProgramId } = useSession();
  const template = useStageTemplateQuery(stageId);
  const stages = useStagesQuery(currentProgramId);
  const stage = stages.data?.find((item) => item.id === stageId);
  const editable = can.editTemplate(user?.role);
  const [adding, setAdding] = useState(false);
  const [showRetired, setShowRetired] = useState(false);
  const [notice, setNotice] = useState<string | null>(null);
  const title = stage ? `Checklist template · ${stage.name}` : 'Checklist template';

  const items = template.data?.items ?? [];
  const retiredCount = items.filter((item) => item.retired).length;
  const shown = showRetired ? items : items.filter((item) => !item.retired);

  return (
    <Screen testID="template-screen">
      <PageTitle title={title} />
      <TextLink href="/stages" label="Back to stages" />
      <View style={styles.header}>
        <Heading level={1} variant="title">
          {title}
        </Heading>
        <Notice tone="warning" message={TEMPLATE_NOTE} testID="template-note" />
      </View>
      {notice ? <Notice tone="success" message={notice} /> : null}
      {editable ? (
        adding ? (
          <Card>
            <Heading level={2} variant="heading">
              New item
            </Heading>
            <TemplateItemForm
              stageId={stageId}
              onDone={(message) => {
                setAdding(false);
                setNotice(message || null);
              }}
            />
          </Card>
        ) : (
          <Button label="Add an item" icon="plus" compact onPress={() => setAdding(true)} testID="template-add" />
        )
      ) : (
        <Text tone="muted">Engineers and leads edit templates.</Text>
      )}
      {retiredCount > 0 ? (
        <Checkbox label={`Show retired items (${retiredCount})`} checked={showRetired} onChange={setShowRetired} testID="template-show-retired" />
      ) : null}
      {template.isPending ? (
        <LoadingState label="Loading the template…" />
      ) : template.isError ? (
        <ErrorState message={errorMessage(template.error)} onRetry={() => void template.refetch()} retrying={template.isFetching} />
      ) : shown.length === 0 ? (
        <EmptyState title="No items yet." message={editable ? 'Add the first one above.' : undefined} />
      ) : (
        SYSTEMS.map((system) => {
          const group = shown.filter((item) => item.system === system).sort((a, b) => a.position - b.position);
          if (group.length === 0) return null;
          return (
            <View key={system} style={styles.group} testID={`template-group-${system}`}>
              <Heading level={2} variant="heading">
                {SYSTEM_LABELS[system]}
              </Heading>
              {group.map((item) => (
                <TemplateItemCard key={item.id} item={item} editable={editable} onNotice={setNotice} />
              ))}
            </View>
          );
        })
      )}
    </Screen>
  );
}

function TemplateItemCard({ item, editable, onNotice }: { item: TemplateItem; editable: boolean; onNotice: (message: string | null) => void }) {
  const update = useUpdateTemplateItemMutation(item.stageId);
  const [editing, setEditing] = useState(false);
  const [error, setError] = useState<string | null>(null);
  const tid = `template-item-${item.id}`;

  const toggleRetired = async () => {
    setError(null);
    try {
      await update.mutateAsync({ id: item.id, version: item.version, retired: !item.retired });
      onNotice(item.retired ? `“${item.title}” is back in the template.` : `“${item.title}” is retired from the template.`);
    } catch (cause) {
      setError(isApiError(cause) && cause.status === 409 ? 'Someone else changed this item first. The template is refreshed: try again.' : errorMessage(cause));
    }
  };

  return (
    <Card testID={tid}>
      {editing ? (
        <TemplateItemForm
          stageId={item.stageId}
          item={item}
          onDone={(message) => {
            setEditing(false);
            onNotice(message || null);
          }}
        />
      ) : (
        <>
          <Text variant="bodyStrong">{item.title}</Text>
          <View style={styles.badges}>
            {item.requiredForGate ? <Badge label="Required for the gate" tone="primary" /> : <Badge label="Optional" />}
            {item.hvQualified ? <Badge label="High-voltage qualified" tone="danger" /> : null}
            {item.retired ? <Badge label="Retired" tone="warning" /> : null}
          </View>
          {item.expectedPartNumber || item.expectedRevision ? (
            <Text variant="caption" tone="muted">
              Expected part {item.expectedPartNumber || '—'}
              {item.expectedRevision ? `, revision ${item.expectedRevision}` : ''}
            </Text>
          ) : null}
          {item.instructions ? <Text>{item.instructions}</Text> : null}
          {error ? <Notice message={error} /> : null}
          {editable ? (
            <View style={styles.buttons}>
              <Button label="Edit" variant="secondary" compact accessibilityLabel={`Edit ${item.title}`} onPress={() => setEditing(true)} testID={`${tid}-edit`} />
              <Button
                label={item.retired ? 'Restore' : 'Retire'}
                variant="secondary"
                compact
                loading={update.isPending}
                accessibilityLabel={`${item.retired ? 'Restore' : 'Retire'} ${item.title}`}
                onPress={() => void toggleRetired()}
                testID={`${tid}-retire`}
              />
            </View>
          ) : null}
        </>
      )}
    </Card>
  );
}

function TemplateItemForm({ stageId, item, onDone }: { stageId: string; item?: TemplateItem; onDone: (message: string) => void }) {
  const add = useAddTemplateItemMutation(stageId);
  const update = useUpdateTemplateItemMutation(stageId);
  const [formError, setFormError] = useState<string | null>(null);
  const { control, handleSubmit, setError } = useForm<ItemInput, unknown, ItemOutput>({
    resolver: zodResolver(TemplateItemInputSchema),
    defaultValues: {
      system: item?.system ?? 'body',
      title: item?.title ?? '',
      instructions: item?.instructions ?? '',
      expectedPartNumber: item?.expectedPartNumber ?? '',
      expectedRevision: item?.expectedRevision ?? '',
      requiredForGate: item?.requiredForGate ?? true,
      hvQualified: item?.hvQualified ?? false,
    },
  });

  const onSubmit = handleSubmit(async (values) => {
    setFormError(null);
    try {
      if (item) {
        await update.mutateAsync({ id: item.id, version: item.version, ...values });
        onDone(`“${values.title}” saved. ${TEMPLATE_NOTE}`);
      } else {
        await add.mutateAsync(values);
        onDone(`“${values.title}” added. ${TEMPLATE_NOTE}`);
      }
    } catch (error) {
      if (isApiError(error) && error.status === 409) {
        setFormError('Someone else changed this item first. The template is refreshed: cancel and edit it again.');
        return;
      }
      if (!applyServerFieldErrors(error, setError, FIELDS)) setFormError(errorMessage(error));
    }
  });

  const tid = item ? `template-form-${item.id}` : 'template-form';
  return (
    <View style={styles.form} testID={tid}>
      <Controller
        control={control}
        name="system"
        render={({ field, fieldState }) => (
          <Select label="System" options={SYSTEM_OPTIONS} value={field.value} onChange={field.onChange} error={fieldState.error?.message} testID={`${tid}-system`} />
        )}
      />
      <FormTextField control={control} name="title" label="Title" testID={`${tid}-title`} />
      <FormTextField control={control} name="instructions" label="Instructions" multiline numberOfLines={3} testID={`${tid}-instructions`} />
      <View style={styles.pair}>
        <View style={styles.grow}>
          <FormTextField control={control} name="expectedPartNumber" label="Expected part number" autoCapitalize="characters" testID={`${tid}-part`} />
        </View>
        <View style={styles.grow}>
          <FormTextField control={control} name="expectedRevision" label="Revision" autoCapitalize="characters" testID={`${tid}-revision`} />
        </View>
      </View>
      <Controller
        control={control}
        name="requiredForGate"
        render={({ field }) => (
          <Checkbox
            label="Required for the gate"
            description="Counts in the checklist part of the readiness score."
            checked={Boolean(field.value)}
            onChange={field.onChange}
            testID={`${tid}-required`}
          />
        )}
      />
      <Controller
        control={control}
        name="hvQualified"
        render={({ field }) => (
          <Checkbox
            label="Needs a high-voltage qualified person"
            description="The checklist shows the high-voltage caution on this item."
            checked={Boolean(field.value)}
            onChange={field.onChange}
            testID={`${tid}-hv`}
          />
        )}
      />
      {formError ? <Notice message={formError} /> : null}
      <View style={styles.buttons}>
        <Button label={item ? 'Save item' : 'Add item'} compact onPress={() => void onSubmit()} loading={add.isPending || update.isPending} testID={`${tid}-save`} />
        <Button label="Cancel" variant="ghost" compact onPress={() => onDone('')} />
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  header: {
    gap: spacing.sm,
  },
  group: {
    gap: spacing.md,
    paddingTop: spacing.md,
    borderTopWidth: 1,
    borderTopColor: colors.border,
  },
  badges: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.xs,
  },
  buttons: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.sm,
  },
  form: {
    gap: spacing.md,
  },
  pair: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.md,
  },
  grow: {
    flexGrow: 1,
    flexBasis: 160,
  },
});
