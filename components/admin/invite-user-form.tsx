import { zodResolver } from '@hookform/resolvers/zod';
import { useState } from 'react';
import { Controller, useForm } from 'react-hook-form';
import { StyleSheet, View } from 'react-native';
import { FormTextField } from '@/components/form/form-text-field';
import { applyServerFieldErrors } from '@/components/form/server-errors';
import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { Select } from '@/components/ui/select';
import { Notice } from '@/components/ui/states';
import { Heading, Text } from '@/components/ui/text';
import { spacing } from '@/components/theme/tokens';
import { errorMessage } from '@/hooks/api/api-client';
import { useInviteUserMutation } from '@/hooks/queries/admin';
import { useSession } from '@/hooks/use-session';
import { InviteUserSchema } from '@/shared/schemas/admin';
import { ROLE_OPTIONS, programOptions } from './role-options';

export function InviteUserForm() {
  const { programs, currentProgramId } = useSession();
  const invite = useInviteUserMutation();
  const [sentTo, setSentTo] = useState<string | null>(null);
  const [formError, setFormError] = useState<string | null>(null);
  const { control, handleSubmit, setError, reset } = useForm({
    resolver: zodResolver(InviteUserSchema),
    defaultValues: {
      email: '',
      name: '',
      role: 'technician' as const,
      programIds: currentProgramId ? [currentProgramId] : [],
    },
  });

  const onSubmit = handleSubmit(async (values) => {
    setSentTo(null);
    setFormError(null);
    try {
      const user = await invite.mutateAsync(values);
      setSentTo(user.email);
      reset({ email: '', name: '', role: values.role, programIds: values.programIds });
    } catch (error) {
      const applied = applyServerFieldErrors(error, setError, ['email', 'name', 'role', 'programIds']);
      if (!applied) setFormError(errorMessage(error));
    }
  });

  return (
    <Card testID="invite-form">
      <Heading level={2} variant="heading">
        Invite someone
      </Heading>
      <Text tone="muted">They get an e-mail with a link to choose their password.</Text>
      <View style={styles.fields}>
        <FormTextField
          control={control}
          name="email"
          label="E-mail"
          testID="invite-email"
          keyboardType="email-address"
          inputMode="email"
          autoCapitalize="none"
          autoCorrect={false}
          autoComplete="off"
        />
        <FormTextField control={control} name="name" label="Full name" testID="invite-name" autoComplete="off" autoCapitalize="words" />
        <Controller
          control={control}
          name="role"
          render={({ field, fieldState }) => (
            <Select
              label="Role"
              options={ROLE_OPTIONS}
              value={field.value}
              onChange={field.onChange}
              error={fieldState.error?.message}
              testID="invite-role"
            />
          )}
        />
        <Controller
          control={control}
          name="programIds"
          render={({ field, fieldState }) => (
            <Select
              multiple
              label="Programs"
              options={programOptions(programs, 'invite-program')}
              value={field.value}
              onChange={field.onChange}
              error={fieldState.error?.message}
              hint={programs.length === 0 ? 'Create a program first: people join through programs.' : undefined}
              testID="invite-programs"
            />
          )}
        />
        {sentTo ? <Notice tone="success" message={`Invitation sent to ${sentTo}.`} testID="invite-sent" /> : null}
        {formError ? <Notice message={formError} testID="invite-error" /> : null}
        <Button label="Send invitation" onPress={() => void onSubmit()} loading={invite.isPending} testID="invite-submit" />
      </View>
    </Card>
  );
}

const styles = StyleSheet.create({
  fields: {
    gap: spacing.lg,
  },
});
