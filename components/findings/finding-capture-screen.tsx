import { zodResolver } from '@hookform/resolvers/zod';
import { useRouter } from 'expo-router';
import { useCallback, useEffect, useState } from 'react';
import { Controller, useForm } from 'react-hook-form';
import { StyleSheet, View } from 'react-native';
import { FormTextField } from '@/components/form/form-text-field';
import { applyServerFieldErrors } from '@/components/form/server-errors';
import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { PageTitle } from '@/components/ui/page-title';
import { ProgressBar } from '@/components/ui/progress-bar';
import { Screen } from '@/components/ui/screen';
import { Select, type SelectOption } from '@/components/ui/select';
import { Notice } from '@/components/ui/states';
import { Heading, Text } from '@/components/ui/text';
import { TextLink } from '@/components/ui/text-link';
import { spacing } from '@/components/theme/tokens';
import { errorMessage } from '@/hooks/api/api-client';
import { randomId } from '@/hooks/api/ids';
import { useIsOnline } from '@/hooks/offline/use-offline-queue';
import type { QueuedPhoto } from '@/hooks/offline/photo-data';
import { useSendProgress } from '@/hooks/offline/send-progress';
import { useAssetQuery, useChecklistQuery } from '@/hooks/queries/assets';
import { useCreateFindingMutation, useProgramPeopleQuery, type FindingCapture } from '@/hooks/queries/findings';
import { useSession } from '@/hooks/use-session';
import { FINDING_ERROR_SENTENCES } from '@/shared/api/finding-paths';
import { FINDING_MEMBER_ROLES, isPastDueDate } from '@/shared/domain/finding-workflow';
import { SYSTEM_LABELS, SYSTEMS, type System } from '@/shared/schemas/assets';
import type { Person } from '@/shared/schemas/findings';
import { AssetPicker } from './asset-picker';
import { CapturePhotos } from './capture-photos';
import { DueDateField } from './due-date-field';
import { SafetyCaution } from './finding-badges';
import { EMPTY_FINDING_FORM, FindingFormSchema, toCreateFinding } from './finding-form-schema';
import { SeverityChoice } from './severity-choice';

export type FindingCaptureParams = { assetId?: string; checklistItemId?: string };

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;
const FIELDS = ['title', 'severity', 'description', 'system', 'ownerId', 'dueDate', 'watcherIds'] as const;

const SYSTEM_OPTIONS: SelectOption<System>[] = SYSTEMS.map((system) => ({ value: system, label: SYSTEM_LABELS[system] }));

/** Owner and watcher choices: me first, then the people seen on the program's findings. */
function peopleOptions(people: readonly Person[], me: Person | null): SelectOption<string>[] {
  const others = people.filter((person) => person.id !== me?.id).map((person) => ({ value: person.id, label: person.name }));
  return me ? [{ value: me.id, label: `Me (${me.name})` }, ...others] : others;
}

/**
 * Filing a finding in a few taps: the photo first, then title and severity; the rest is
 * optional and folded away. Works without a connection: the capture waits on the device.
 */
export function FindingCaptureScreen({ params }: { params: FindingCaptureParams }) {
  const router = useRouter();
  const { user, currentProgramId } = useSession();
  const online = useIsOnline();
  const paramAssetId = params.assetId && UUID.test(params.assetId) ? params.assetId : null;
  const checklistItemId = paramAssetId && params.checklistItemId && UUID.test(params.checklistItemId) ? params.checklistItemId : undefined;
  const [picked, setPicked] = useState<{ id: string; tag: string } | null>(null);
  const assetId = paramAssetId ?? picked?.id ?? null;
  const asset = useAssetQuery(paramAssetId);
  const checklist = useChecklistQuery(checklistItemId ? paramAssetId : null);
  const item = checklist.data?.groups.flatMap((group) => group.items).find((entry) => entry.id === checklistItemId);
  const assetTag = asset.data?.tag ?? picked?.tag ?? null;
  const people = useProgramPeopleQuery(currentProgramId);

  const [captureKey, setCaptureKey] = useState(() => randomId());
  const [photos, setPhotos] = useState<QueuedPhoto[]>([]);
  const [more, setMore] = useState(false);
  const [formError, setFormError] = useState<string | null>(null);
  const [assetError, setAssetError] = useState<string | undefined>();
  const [result, setResult] = useState<{ queued: string } | { findingId: string; photoErrors: string[] } | null>(null);
  const create = useCreateFindingMutation();
  const progress = useSendProgress(create.isPending && !create.isPaused ? captureKey : null);

  const { control, handleSubmit, reset, setError, watch } = useForm({
    resolver: zodResolver(FindingFormSchema),
    defaultValues: EMPTY_FINDING_FORM,
  });
  const severity = watch('severity');

  const { reset: resetMutation } = create;
  const startNext = useCallback(() => {
    reset(EMPTY_FINDING_FORM);
    setPhotos([]);
    setMore(false);
    setFormError(null);
    setCaptureKey(randomId());
    resetMutation();
  }, [resetMutation, reset]);

  // No connection (or it dropped while sending): the capture waits on this device, and the form is ready for the next one.
  const pausedTitle = create.isPaused ? create.variables?.body.title : undefined;
  useEffect(() => {
    if (pausedTitle === undefined) return;
    setResult({ queued: pausedTitle });
    startNext();
  }, [pausedTitle, startNext]);

  const onSubmit = handleSubmit((values) => {
    setFormError(null);
    setResult(null);
    if (!assetId) {
      setAssetError('Choose the asset this finding is on.');
      return;
    }
    if (values.dueDate && isPastDueDate(values.dueDate, new Date())) {
      setError('dueDate', { type: 'validate', message: 'Choose today or a later date.' });
      return;
    }
    const capture: FindingCapture = { key: captureKey, body: toCreateFinding(values, assetId, checklistItemId), photos, assetTag };
    create.mutate(capture, {
      onSuccess: ({ finding, photoErrors }) => {
        if (photoErrors.length) setResult({ findingId: finding.id, photoErrors });
        else router.replace(`/findings/${finding.id}`);
      },
      onError: (error) => {
        if (!applyServerFieldErrors(error, setError, FIELDS)) setFormError(errorMessage(error, FINDING_ERROR_SENTENCES));
      },
    });
  });

  const me: Person | null = user ? { id: user.id, name: user.name } : null;
  const options = peopleOptions(people.data ?? [], me);
  const mayFile = Boolean(user && (FINDING_MEMBER_ROLES as readonly string[]).includes(user.role));
  const sending = create.isPending && !create.isPaused;
  const backHref = paramAssetId ? `/assets/${paramAssetId}` : '/findings';

  if (user && !mayFile) {
    return (
      <Screen narrow>
        <PageTitle title="File a finding" />
        <Notice tone="warning" message="Findings are filed by the people who work in a program. An administrator’s account cannot file them." />
        <TextLink href="/" label="Back to Home" />
      </Screen>
    );
  }

  return (
    <Screen narrow testID="finding-capture">
      <PageTitle title="File a finding" />
      <TextLink href={backHref} label={paramAssetId ? `Back to ${assetTag ?? 'the asset'}` : 'Back to findings'} testID="finding-capture-back" />
      <View style={styles.head}>
        <Heading level={1} variant="title">
          File a finding{assetTag ? ` on ${assetTag}` : ''}
        </Heading>
        {item ? (
          <Text tone="muted" testID="finding-from-item">
            From the checklist item “{item.title}”
          </Text>
        ) : checklistItemId ? (
          <Text tone="muted">From a checklist item</Text>
        ) : null}
        {!online ? (
          <Notice
            tone="warning"
            message="No connection. You can still file: the finding and its photos stay on this device and are sent when the connection is back."
            testID="finding-capture-offline"
          />
        ) : null}
      </View>

      {result && 'queued' in result ? (
        <Notice
          tone="success"
          message={`Saved on this device: “${result.queued}”. It will be sent when the connection is back. You can file the next one now.`}
          testID="finding-queued"
        />
      ) : null}
      {result && 'findingId' in result ? (
        <View style={styles.result} testID="finding-photo-errors">
          <Notice tone="warning" message={`The finding was filed, but not every photo went with it. ${result.photoErrors.join(' ')}`} />
          <Button label="Open the finding" onPress={() => router.replace(`/findings/${result.findingId}`)} testID="finding-open-filed" />
        </View>
      ) : null}

      {!paramAssetId ? (
        picked ? (
          <View style={styles.pickedRow}>
            <Text variant="bodyStrong" testID="finding-asset-picked">
              Asset: {picked.tag}
            </Text>
            <Button label="Change" variant="ghost" compact onPress={() => setPicked(null)} testID="finding-asset-change" />
          </View>
        ) : (
          <AssetPicker
            programId={currentProgramId}
            error={assetError}
            onPick={(value) => {
              setPicked(value);
              setAssetError(undefined);
            }}
          />
        )
      ) : null}

      <CapturePhotos
        photos={photos}
        onAdd={(photo) => setPhotos((list) => [...list, photo])}
        onRemove={(key) => setPhotos((list) => list.filter((photo) => photo.key !== key))}
      />

      <FormTextField control={control} name="title" label="What is wrong?" placeholder="Short title, like “HV connector not latched”" testID="finding-title" />

      <Controller
        control={control}
        name="severity"
        render={({ field, fieldState }) => <SeverityChoice value={field.value} onChange={field.onChange} error={fieldState.error?.message} />}
      />
      {severity === 'safety' ? <SafetyCaution /> : null}

      {more ? (
        <Card testID="finding-more">
          <FormTextField control={control} name="description" label="Description (optional)" multiline numberOfLines={4} testID="finding-description" />
          <Controller
            control={control}
            name="system"
            render={({ field }) => (
              <Select
                label="System (optional)"
                options={SYSTEM_OPTIONS}
                value={field.value}
                onChange={(value) => field.onChange(field.value === value ? null : value)}
                hint={item ? `Left empty, it takes the item’s system.` : undefined}
                testID="finding-system"
              />
            )}
          />
          <Controller
            control={control}
            name="ownerId"
            render={({ field, fieldState }) => (
              <Select
                label="Owner (optional)"
                options={options}
                value={field.value}
                onChange={(value) => field.onChange(field.value === value ? null : value)}
                error={fieldState.error?.message}
                hint="Press the chosen name again to leave it unassigned. The owner gets an e-mail."
                testID="finding-owner"
              />
            )}
          />
          <Controller
            control={control}
            name="dueDate"
            render={({ field, fieldState }) => <DueDateField value={field.value ?? ''} onChange={field.onChange} error={fieldState.error?.message} />}
          />
          <Controller
            control={control}
            name="watcherIds"
            render={({ field, fieldState }) => (
              <Select
                multiple
                label="Watchers (optional)"
                options={options}
                value={field.value ?? []}
                onChange={field.onChange}
                error={fieldState.error?.message}
                hint="They get an e-mail when the status changes."
                testID="finding-watchers"
              />
            )}
          />
        </Card>
      ) : (
        <Button
          label="Add details (optional)"
          icon="chevron-down"
          variant="secondary"
          compact
          onPress={() => setMore(true)}
          accessibilityHint="Description, system, owner, due date and watchers"
          testID="finding-more-open"
        />
      )}

      {formError ? <Notice message={formError} testID="finding-capture-error" /> : null}
      {progress ? (
        <ProgressBar
          value={(progress.step + progress.fraction) / progress.steps}
          label="Sending the finding"
          caption={progress.step === 0 ? 'Sending the finding…' : `Sending photo ${progress.step} of ${progress.steps - 1}… ${Math.round(progress.fraction * 100)}%`}
          testID="finding-send-progress"
        />
      ) : null}
      <Button
        label={online ? 'File finding' : 'Save on this device'}
        icon={online ? 'check' : undefined}
        fullWidth
        loading={sending}
        onPress={() => void onSubmit()}
        testID="finding-submit"
      />
    </Screen>
  );
}

const styles = StyleSheet.create({
  head: {
    gap: spacing.sm,
  },
  result: {
    gap: spacing.sm,
  },
  pickedRow: {
    flexDirection: 'row',
    alignItems: 'center',
    gap: spacing.md,
  },
});
