import { zodResolver } from '@hookform/resolvers/zod';
import { Redirect } from 'expo-router';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { FormTextField } from '@/components/form/form-text-field';
import { applyServerFieldErrors } from '@/components/form/server-errors';
import { Button } from '@/components/ui/button';
import { Notice } from '@/components/ui/states';
import { TextLink } from '@/components/ui/text-link';
import { errorMessage } from '@/hooks/api/api-client';
import { useSession } from '@/hooks/use-session';
import { SignInSchema } from '@/shared/schemas/auth';
import { AuthFrame } from './auth-frame';
import { safeNextPath } from './safe-next';

export function SignInScreen({ next }: { next?: string }) {
  const { status, signIn } = useSession();
  const [formError, setFormError] = useState<string | null>(null);
  const {
    control,
    handleSubmit,
    setError,
    formState: { isSubmitting },
  } = useForm({
    resolver: zodResolver(SignInSchema),
    defaultValues: { email: '', password: '' },
  });

  if (status !== 'signed-out') return <Redirect href={safeNextPath(next)} />;

  const onSubmit = handleSubmit(async ({ email, password }) => {
    setFormError(null);
    try {
      await signIn(email, password);
    } catch (error) {
      if (!applyServerFieldErrors(error, setError, ['email', 'password'])) setFormError(errorMessage(error));
    }
  });

  return (
    <AuthFrame title="Sign in" footer={<TextLink href="/forgot-password" label="Forgot password?" testID="sign-in-forgot" />}>
      <FormTextField
        control={control}
        name="email"
        label="E-mail"
        testID="sign-in-email"
        keyboardType="email-address"
        inputMode="email"
        autoCapitalize="none"
        autoCorrect={false}
        autoComplete="email"
        textContentType="username"
        returnKeyType="next"
      />
      <FormTextField
        control={control}
        name="password"
        label="Password"
        testID="sign-in-password"
        secret
        autoCapitalize="none"
        autoComplete="current-password"
        textContentType="password"
        returnKeyType="go"
        onSubmitEditing={() => void onSubmit()}
      />
      {formError ? <Notice message={formError} testID="sign-in-error" /> : null}
      <Button label="Sign in" onPress={() => void onSubmit()} loading={isSubmitting} fullWidth testID="sign-in-submit" />
    </AuthFrame>
  );
}
