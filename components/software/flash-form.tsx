import { zodResolver } from '@hookform/resolvers/zod';
import { useState } from 'react';
import { Controller, useForm } from 'react-hook-form';
import { StyleSheet, View } from 'react-native';
import { z } from 'zod';
import { FormTextField } from '@/components/form/form-text-field';
import { applyServerFieldErrors } from '@/components/form/server-errors';
import { DateTimeField } from '@/components/ui/date-field';
import { fromLocalInput, toLocalInput, zoneName } from '@/components/fleet/fleet-time';
import { Button } from '@/components/ui/button';
import { Notice } from '@/components/ui/states';
import { Text } from '@/components/ui/text';
import { spacing } from '@/components/theme/tokens';
import { errorMessage } from '@/hooks/api/api-client';
import { useSession } from '@/hooks/use-session';
import { RecordFlashSchema, type InstalledSoftware } from '@/shared/schemas/software';

// The form of a flash recorded by hand, on the asset's software tab and on the reflash list:
// version, software number (F188), hardware number (F191), ECU serial (F18C) and when it was
// flashed (now unless told; never in the future). Who flashed it is the person recording it.

/** A flash time a few minutes ahead is a clock that runs fast, not the future (the server allows the same). */
const FUTURE_SLACK_MS = 5 * 60 * 1000;

const optionalIdent = RecordFlashSchema.shape.softwareNumber.unwrap();

export const FlashFormSchema = z.object({
  softwareVersion: RecordFlashSchema.shape.softwareVersion,
  softwareNumber: optionalIdent,
  hardwareNumber: optionalIdent,
  ecuSerial: optionalIdent,
  /** Local `YYYY-MM-DDTHH:MM`, sent as a UTC instant. */
  flashedAt: z.string().transform((value, ctx) => {
    const iso = fromLocalInput(value);
    if (!iso) {
      ctx.addIssue({ code: 'custom', message: 'Use a date and time like 2026-12-02 14:30.' });
      return z.NEVER;
    }
    if (new Date(iso).getTime() > Date.now() + FUTURE_SLACK_MS) {
      ctx.addIssue({ code: 'custom', message: 'A flash cannot be in the future.' });
      return z.NEVER;
    }
    return iso;
  }),
  note: z.string().trim().max(500, 'Use at most 500 characters.'),
});
export type FlashFormInput = z.input<typeof FlashFormSchema>;
export type FlashFormOutput = z.output<typeof FlashFormSchema>;

/** What the form sends: empty identification values are left out (the server keeps what the ECU was last read with). */
export type FlashValues = {
  softwareVersion: string;
  softwareNumber?: string;
  hardwareNumber?: string;
  ecuSerial?: string;
  flashedAt: string;
  note: string;
};

const FIELDS = ['softwareVersion', 'softwareNumber', 'hardwareNumber', 'ecuSerial', 'flashedAt', 'note'] as const;

export function FlashForm({
  ecuCode,
  version,
  installed,
  lockVersion = false,
  submitLabel = 'Record the flash',
  testID,
  onSubmit,
  onCancel,
}: {
  ecuCode: string;
  /** The version to start from (the baseline's target). */
  version: string;
  installed: Pick<InstalledSoftware, 'softwareVersion' | 'softwareNumber' | 'hardwareNumber' | 'ecuSerial'> | null;
  /** The reflash list flashes to its target: the version is shown, not typed. */
  lockVersion?: boolean;
  submitLabel?: string;
  testID: string;
  /** Sends the flash; a thrown error goes next to its field or under the form. */
  onSubmit: (values: FlashValues) => Promise<void>;
  onCancel: () => void;
}) {
  const { user } = useSession();
  const [formError, setFormError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const { control, handleSubmit, setError } = useForm<FlashFormInput, unknown, FlashFormOutput>({
    resolver: zodResolver(FlashFormSchema),
    defaultValues: {
      softwareVersion: version,
      softwareNumber: installed && installed.softwareVersion === version ? installed.softwareNumber : '',
      hardwareNumber: installed?.hardwareNumber ?? '',
      ecuSerial: installed?.ecuSerial ?? '',
      flashedAt: toLocalInput(new Date()),
      note: '',
    },
  });

  const submit = handleSubmit(async (values) => {
    setFormError(null);
    setBusy(true);
    try {
      await onSubmit({
        softwareVersion: values.softwareVersion,
        softwareNumber: values.softwareNumber || undefined,
        hardwareNumber: values.hardwareNumber || undefined,
        ecuSerial: values.ecuSerial || undefined,
        flashedAt: values.flashedAt,
        note: values.note,
      });
    } catch (error) {
      if (!applyServerFieldErrors(error, setError, FIELDS)) setFormError(errorMessage(error));
    } finally {
      setBusy(false);
    }
  });

  return (
    <View style={styles.form} testID={testID}>
      {lockVersion ? (
        <Text>
          Flash {ecuCode} to <Text weight="semibold">{version}</Text>
          {installed ? ` (now ${installed.softwareVersion})` : ''}.
        </Text>
      ) : (
        <FormTextField
          control={control}
          name="softwareVersion"
          label={`Version flashed on ${ecuCode}`}
          autoCapitalize="none"
          autoCorrect={false}
          testID={`${testID}-version`}
        />
      )}
      <View style={styles.pair}>
        <View style={styles.grow}>
          <FormTextField
            control={control}
            name="softwareNumber"
            label="Software number (F188)"
            hint="Optional."
            autoCapitalize="characters"
            autoCorrect={false}
            testID={`${testID}-software-number`}
          />
        </View>
        <View style={styles.grow}>
          <FormTextField
            control={control}
            name="hardwareNumber"
            label="Hardware number (F191)"
            hint={installed ? 'Empty keeps the last one recorded.' : 'Optional.'}
            autoCapitalize="characters"
            autoCorrect={false}
            testID={`${testID}-hardware-number`}
          />
        </View>
        <View style={styles.grow}>
          <FormTextField
            control={control}
            name="ecuSerial"
            label="ECU serial (F18C)"
            hint={installed ? 'Empty keeps the last one recorded.' : 'Optional.'}
            autoCapitalize="characters"
            autoCorrect={false}
            testID={`${testID}-serial`}
          />
        </View>
      </View>
      <Controller
        control={control}
        name="flashedAt"
        render={({ field, fieldState }) => (
          <DateTimeField
            label="Flashed at"
            value={field.value}
            onChange={field.onChange}
            error={fieldState.error?.message}
            hint={`Your time (${zoneName()}); now unless you change it, not later than now.`}
            testID={`${testID}-time`}
          />
        )}
      />
      <FormTextField control={control} name="note" label="Note (optional)" testID={`${testID}-note`} />
      <Text variant="caption" tone="muted">
        Recorded as flashed by {user?.name ?? 'you'}, by hand.
      </Text>
      {formError ? <Notice message={formError} testID={`${testID}-error`} /> : null}
      <View style={styles.actions}>
        <Button label={submitLabel} compact loading={busy} onPress={() => void submit()} testID={`${testID}-save`} />
        <Button label="Cancel" variant="ghost" compact onPress={onCancel} testID={`${testID}-cancel`} />
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
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
    flexBasis: 180,
  },
  actions: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.sm,
  },
});
