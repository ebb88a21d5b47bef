import { zodResolver } from '@hookform/resolvers/zod';
import { useState } from 'react';
import { Controller, useForm, useWatch } from 'react-hook-form';
import { StyleSheet, View } from 'react-native';
import { FormTextField } from '@/components/form/form-text-field';
import { applyServerFieldErrors } from '@/components/form/server-errors';
import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { Select } from '@/components/ui/select';
import { Notice } from '@/components/ui/states';
import { Heading } from '@/components/ui/text';
import { spacing } from '@/components/theme/tokens';
import {
  conflictCurrentTest,
  useCreateValidationTestMutation,
  useUpdateValidationTestMutation,
} from '@/hooks/queries/validation';
import { useBreakpoints } from '@/hooks/use-breakpoints';
import type { Stage } from '@/shared/schemas/assets';
import type { ValidationTest } from '@/shared/schemas/validation';
import { SAMPLE_SIZE_FIELDS } from './calculator-card';
import { SampleSizePanel } from './sample-size-panel';
import {
  changedTestFields,
  emptyTestForm,
  TEST_FORM_FIELDS,
  TestFormSchema,
  testFormValues,
  toCreateTest,
  type TestFormInput,
  type TestFormOutput,
} from './test-form-schema';
import { previewSampleSize, validationErrorMessage } from './validation-words';

export type TestFormProps = {
  stages: readonly Stage[];
  /** The test to edit; without one the form creates a test. */
  test?: ValidationTest;
  defaultStageId?: string;
  onSaved: (test: ValidationTest, created: boolean) => void;
};

/**
 * Creates or edits a test. The sample size below the four numbers is the shared success-run
 * function run on every keystroke; the server computes the same when the test is saved.
 */
export function TestForm({ stages, test, defaultStageId, onSaved }: TestFormProps) {
  const { isWide } = useBreakpoints();
  const create = useCreateValidationTestMutation();
  const update = useUpdateValidationTestMutation(test?.id ?? '');
  const [base, setBase] = useState(test);
  const [notice, setNotice] = useState<{ tone: 'danger' | 'success' | 'warning'; message: string } | null>(null);
  const { control, handleSubmit, setError, reset } = useForm<TestFormInput, unknown, TestFormOutput>({
    resolver: zodResolver(TestFormSchema),
    defaultValues: test ? testFormValues(test) : emptyTestForm(defaultStageId ?? stages.find((s) => !s.retired)?.id ?? ''),
  });
  const [reliability, confidence, testToLife, shape] = useWatch({ control, name: ['reliability', 'confidence', 'testToLife', 'shape'] });
  const preview = previewSampleSize({ reliability, confidence, testToLife, shape });

  const onSubmit = handleSubmit(async (values) => {
    setNotice(null);
    try {
      if (!base) {
        const saved = await create.mutateAsync(toCreateTest(values));
        onSaved(saved, true);
        return;
      }
      const change = changedTestFields(base, values);
      if (Object.keys(change).length === 0) {
        setNotice({ tone: 'success', message: 'Nothing was changed.' });
        return;
      }
      const saved = await update.mutateAsync({ ...change, version: base.version });
      setBase(saved);
      reset(testFormValues(saved));
      setNotice({ tone: 'success', message: 'Saved.' });
      onSaved(saved, false);
    } catch (error) {
      const current = conflictCurrentTest(error);
      if (current) {
        setBase(current);
        reset(testFormValues(current));
        setNotice({ tone: 'warning', message: 'Someone else saved this test while you were editing it. Their version is shown now; make your change again and save.' });
        return;
      }
      if (!applyServerFieldErrors(error, setError, TEST_FORM_FIELDS)) setNotice({ tone: 'danger', message: validationErrorMessage(error) });
    }
  });

  const stageOptions = stages
    .filter((s) => !s.retired || s.id === base?.stageId)
    .map((s) => ({ value: s.id, label: s.name, testID: `vtest-stage-${s.id}` }));
  const saving = create.isPending || update.isPending;

  return (
    <Card testID="vtest-form">
      <Heading level={2} variant="heading">
        {base ? 'Test and targets' : 'New test'}
      </Heading>
      <Controller
        control={control}
        name="stageId"
        render={({ field, fieldState }) => (
          <Select label="Stage" layout="chips" value={field.value || null} onChange={field.onChange} options={stageOptions} error={fieldState.error?.message} testID="vtest-stage" />
        )}
      />
      <FormTextField control={control} name="name" label="Name" placeholder="Damp heat cyclic" testID="vtest-name" />
      <FormTextField
        control={control}
        name="procedureRef"
        label="Procedure reference"
        hint="A standard (for example IEC 60068-2-30 Db) or an internal procedure number."
        autoCapitalize="characters"
        testID="vtest-procedure"
      />
      <FormTextField control={control} name="verifies" label="What it verifies" multiline numberOfLines={3} hint="The requirement or function the test shows is met." testID="vtest-verifies" />
      <View style={[styles.numbers, isWide && styles.numbersWide]}>
        <View style={styles.number}>
          <FormTextField control={control} name="reliability" label={SAMPLE_SIZE_FIELDS.reliability.label} hint={SAMPLE_SIZE_FIELDS.reliability.hint} inputMode="decimal" testID="vtest-reliability" />
        </View>
        <View style={styles.number}>
          <FormTextField control={control} name="confidence" label={SAMPLE_SIZE_FIELDS.confidence.label} hint={SAMPLE_SIZE_FIELDS.confidence.hint} inputMode="decimal" testID="vtest-confidence" />
        </View>
        <View style={styles.number}>
          <FormTextField control={control} name="testToLife" label={SAMPLE_SIZE_FIELDS.testToLife.label} hint={SAMPLE_SIZE_FIELDS.testToLife.hint} inputMode="decimal" testID="vtest-ttl" />
        </View>
        <View style={styles.number}>
          <FormTextField control={control} name="shape" label={SAMPLE_SIZE_FIELDS.shape.label} hint={SAMPLE_SIZE_FIELDS.shape.hint} inputMode="decimal" testID="vtest-shape" />
        </View>
      </View>
      <SampleSizePanel preview={preview} testID="vtest-n" />
      {notice ? <Notice tone={notice.tone} message={notice.message} testID="vtest-notice" /> : null}
      <Button label={base ? 'Save changes' : 'Create test'} onPress={() => void onSubmit()} loading={saving} testID="vtest-save" />
    </Card>
  );
}

const styles = StyleSheet.create({
  numbers: {
    gap: spacing.md,
  },
  numbersWide: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    alignItems: 'flex-start',
  },
  number: {
    flexGrow: 1,
    flexBasis: 180,
    minWidth: 0,
  },
});
