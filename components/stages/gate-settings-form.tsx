import { zodResolver } from '@hookform/resolvers/zod';
import { useState } from 'react';
import { Controller, useForm, type Control } from 'react-hook-form';
import { StyleSheet, View } from 'react-native';
import { z } from 'zod';
import { FormTextField } from '@/components/form/form-text-field';
import { applyServerFieldErrors } from '@/components/form/server-errors';
import { Button } from '@/components/ui/button';
import { Select } from '@/components/ui/select';
import { Notice } from '@/components/ui/states';
import { Text } from '@/components/ui/text';
import { spacing } from '@/components/theme/tokens';
import { errorMessage, isApiError } from '@/hooks/api/api-client';
import { useUpdateStageMutation } from '@/hooks/queries/stages';
import { GateSettingsSchema, type GateSettings, type Stage } from '@/shared/schemas/assets';

const number = (message: string) =>
  z
    .string()
    .trim()
    .refine((value) => /^\d+(\.\d+)?$/.test(value), message)
    .transform(Number);

/** Weights are typed as percentages (40 for 0.4): easier to add up in one's head. */
const GateFormSchema = z
  .object({
    goThreshold: number('Enter a score from 0 to 100.').pipe(z.number().max(100, 'Enter a score from 0 to 100.')),
    conditionalThreshold: number('Enter a score from 0 to 100.').pipe(z.number().max(100, 'Enter a score from 0 to 100.')),
    findingsBudget: number('Enter a number of points above 0.').pipe(z.number().positive('Enter a number of points above 0.').max(10_000)),
    checklist: number('Enter a percentage.').pipe(z.number().max(100, 'At most 100.')),
    findings: number('Enter a percentage.').pipe(z.number().max(100, 'At most 100.')),
    software: number('Enter a percentage.').pipe(z.number().max(100, 'At most 100.')),
    validation: number('Enter a percentage.').pipe(z.number().max(100, 'At most 100.')),
    minDriverLevel: z.enum(['0', '1', '2', '3']),
  })
  .superRefine((v, ctx) => {
    if (v.conditionalThreshold > v.goThreshold) {
      ctx.addIssue({ code: 'custom', path: ['conditionalThreshold'], message: 'The conditional threshold cannot be above the go threshold.' });
    }
    const sum = v.checklist + v.findings + v.software + v.validation;
    if (Math.abs(sum - 100) > 0.1) {
      ctx.addIssue({ code: 'custom', path: ['validation'], message: `The four weights must add up to 100 % (they add up to ${+sum.toFixed(1)} %).` });
    }
  });

type GateFormInput = z.input<typeof GateFormSchema>;
type GateFormOutput = z.output<typeof GateFormSchema>;

const pct = (fraction: number) => String(+(fraction * 100).toFixed(1));

const LEVEL_OPTIONS = [
  { value: '0' as const, label: 'None', description: 'Not driven (bench rigs)' },
  { value: '1' as const, label: 'Level 1' },
  { value: '2' as const, label: 'Level 2' },
  { value: '3' as const, label: 'Level 3' },
];

/** A stage's gate thresholds, findings budget, weights (PRODUCT.md section 4) and driving level. */
export function GateSettingsForm({ stage, onDone }: { stage: Stage; onDone: (message: string) => void }) {
  const update = useUpdateStageMutation();
  const [formError, setFormError] = useState<string | null>(null);
  const { control, handleSubmit, setError } = useForm<GateFormInput, unknown, GateFormOutput>({
    resolver: zodResolver(GateFormSchema),
    defaultValues: {
      goThreshold: String(stage.gate.goThreshold),
      conditionalThreshold: String(stage.gate.conditionalThreshold),
      findingsBudget: String(stage.gate.findingsBudget),
      checklist: pct(stage.gate.weights.checklist),
      findings: pct(stage.gate.weights.findings),
      software: pct(stage.gate.weights.software),
      validation: pct(stage.gate.weights.validation),
      minDriverLevel: String(stage.minDriverLevel) as GateFormInput['minDriverLevel'],
    },
  });

  const onSubmit = handleSubmit(async (values) => {
    setFormError(null);
    const gate: GateSettings = GateSettingsSchema.parse({
      goThreshold: values.goThreshold,
      conditionalThreshold: values.conditionalThreshold,
      findingsBudget: values.findingsBudget,
      weights: {
        checklist: values.checklist / 100,
        findings: values.findings / 100,
        software: values.software / 100,
        validation: values.validation / 100,
      },
    });
    try {
      await update.mutateAsync({ id: stage.id, version: stage.version, gate, minDriverLevel: Number(values.minDriverLevel) });
      onDone(`Gate settings of ${stage.name} saved.`);
    } catch (error) {
      if (isApiError(error) && error.status === 409) {
        setFormError('Someone else changed this stage first. The list is refreshed: open the settings again.');
        return;
      }
      const applied = applyServerFieldErrors(error, setError, []);
      if (!applied) setFormError(errorMessage(error));
    }
  });

  const tid = `stage-${stage.position}-gate`;
  return (
    <View style={styles.form} testID={tid}>
      <Text variant="label">Gate result</Text>
      <View style={styles.row}>
        <Field control={control} name="goThreshold" label="Go from (score)" testID={`${tid}-go`} />
        <Field control={control} name="conditionalThreshold" label="Conditional from" testID={`${tid}-conditional`} />
        <Field control={control} name="findingsBudget" label="Findings budget (points)" testID={`${tid}-budget`} />
      </View>
      <Text variant="label">Weights of the score (%)</Text>
      <View style={styles.row}>
        <Field control={control} name="checklist" label="Checklist" testID={`${tid}-w-checklist`} />
        <Field control={control} name="findings" label="Findings" testID={`${tid}-w-findings`} />
        <Field control={control} name="software" label="Software" testID={`${tid}-w-software`} />
        <Field control={control} name="validation" label="Validation" testID={`${tid}-w-validation`} />
      </View>
      <Controller
        control={control}
        name="minDriverLevel"
        render={({ field, fieldState }) => (
          <Select
            label="Driving level needed"
            options={LEVEL_OPTIONS}
            value={field.value}
            onChange={field.onChange}
            error={fieldState.error?.message}
            hint="The prototype driving level a driver needs for assets on this stage."
            testID={`${tid}-level`}
          />
        )}
      />
      {formError ? <Notice message={formError} /> : null}
      <View style={styles.buttons}>
        <Button label="Save gate settings" compact onPress={() => void onSubmit()} loading={update.isPending} testID={`${tid}-save`} />
        <Button label="Cancel" variant="ghost" compact onPress={() => onDone('')} />
      </View>
    </View>
  );
}

function Field({
  control,
  name,
  label,
  testID,
}: {
  control: Control<GateFormInput, unknown, GateFormOutput>;
  name: keyof GateFormInput;
  label: string;
  testID: string;
}) {
  return (
    <View style={styles.field}>
      <FormTextField control={control} name={name} label={label} inputMode="decimal" keyboardType="numeric" testID={testID} />
    </View>
  );
}

const styles = StyleSheet.create({
  form: {
    gap: spacing.md,
  },
  row: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.md,
  },
  field: {
    minWidth: 130,
    flexGrow: 1,
    flexBasis: 130,
  },
  buttons: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.sm,
  },
});
