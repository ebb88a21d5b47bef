import { zodResolver } from '@hookform/resolvers/zod';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { StyleSheet, View } from 'react-native';
import { FormTextField } from '@/components/form/form-text-field';
import { applyServerFieldErrors } from '@/components/form/server-errors';
import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { Notice } from '@/components/ui/states';
import { Heading } from '@/components/ui/text';
import { spacing } from '@/components/theme/tokens';
import { errorMessage } from '@/hooks/api/api-client';
import { useCreateProgramMutation } from '@/hooks/queries/admin';
import { CreateProgramSchema } from '@/shared/schemas/admin';

export function CreateProgramForm({ onCreated }: { onCreated?: (programId: string) => void }) {
  const create = useCreateProgramMutation();
  const [created, setCreated] = useState<string | null>(null);
  const [formError, setFormError] = useState<string | null>(null);
  const { control, handleSubmit, setError, reset } = useForm({
    resolver: zodResolver(CreateProgramSchema),
    defaultValues: { code: '', name: '' },
  });

  const onSubmit = handleSubmit(async (values) => {
    setCreated(null);
    setFormError(null);
    try {
      const program = await create.mutateAsync(values);
      setCreated(`Program ${program.code} created.`);
      reset({ code: '', name: '' });
      onCreated?.(program.id);
    } catch (error) {
      if (!applyServerFieldErrors(error, setError, ['code', 'name'])) setFormError(errorMessage(error));
    }
  });

  return (
    <Card testID="program-form">
      <Heading level={2} variant="heading">
        New program
      </Heading>
      <View style={styles.fields}>
        <FormTextField
          control={control}
          name="code"
          label="Code"
          hint="Up to 12 letters, digits or dashes, for example EV-12."
          autoCapitalize="characters"
          autoCorrect={false}
          autoComplete="off"
          maxLength={12}
          testID="program-code"
        />
        <FormTextField control={control} name="name" label="Name" autoComplete="off" testID="program-name" />
        {created ? <Notice tone="success" message={created} testID="program-created" /> : null}
        {formError ? <Notice message={formError} testID="program-error" /> : null}
        <Button label="Create program" onPress={() => void onSubmit()} loading={create.isPending} testID="program-submit" />
      </View>
    </Card>
  );
}

const styles = StyleSheet.create({
  fields: {
    gap: spacing.lg,
  },
});
