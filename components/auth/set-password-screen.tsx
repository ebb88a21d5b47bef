import { zodResolver } from '@hookform/resolvers/zod';
import { useRouter } from 'expo-router';
import { useForm } from 'react-hook-form';
import { z } from 'zod';
import { FormTextField } from '@/components/form/form-text-field';
import { applyServerFieldErrors } from '@/components/form/server-errors';
import { Button } from '@/components/ui/button';
import { Notice } from '@/components/ui/states';
import { TextLink } from '@/components/ui/text-link';
import { errorMessage, fieldErrors, isApiError } from '@/hooks/api/api-client';
import { useSetPasswordMutation } from '@/hooks/queries/auth';
import { PasswordSchema, SetPasswordSchema } from '@/shared/schemas/auth';
import { AuthFrame } from './auth-frame';

const NewPasswordSchema = z
  .object({
    password: PasswordSchema,
    confirm: z.string().min(1, 'Repeat the new password.'),
  })
  .refine((values) => values.password === values.confirm, {
    path: ['confirm'],
    message: 'The two passwords are not the same.',
  });

const LINK_INVALID = 'This link has expired or was already used. Ask for a new one.';
const LINK_INCOMPLETE = 'This link is incomplete. Open it again from your e-mail, or ask for a new one.';

export function SetPasswordScreen({ token }: { token?: string }) {
  const router = useRouter();
  const setPassword = useSetPasswordMutation();
  const tokenValid = SetPasswordSchema.shape.token.safeParse(token ?? '').success;
  const { control, handleSubmit, setError } = useForm({
    resolver: zodResolver(NewPasswordSchema),
    defaultValues: { password: '', confirm: '' },
  });

  const onSubmit = handleSubmit(async ({ password }) => {
    try {
      await setPassword.mutateAsync({ token: token ?? '', password });
      router.replace('/');
    } catch (error) {
      applyServerFieldErrors(error, setError, ['password']);
    }
  });

  const error = setPassword.error;
  const linkDead =
    isApiError(error) && (error.code === 'auth/link-invalid' || Boolean(fieldErrors(error).token));
  const generalError =
    error && !linkDead && !fieldErrors(error).password ? errorMessage(error) : null;

  if (!tokenValid || linkDead) {
    return (
      <AuthFrame title="Choose a password" footer={<TextLink href="/sign-in" label="Back to sign in" />}>
        <Notice message={tokenValid ? LINK_INVALID : LINK_INCOMPLETE} testID="set-password-link-invalid" />
        <TextLink href="/forgot-password" label="Send me a new link" testID="set-password-new-link" />
      </AuthFrame>
    );
  }

  return (
    <AuthFrame
      title="Choose a password"
      intro="Use at least 10 characters. A short sentence you will remember works well."
      footer={<TextLink href="/sign-in" label="Back to sign in" />}
    >
      <FormTextField
        control={control}
        name="password"
        label="New password"
        testID="set-password-password"
        secret
        autoCapitalize="none"
        autoComplete="new-password"
        textContentType="newPassword"
        returnKeyType="next"
      />
      <FormTextField
        control={control}
        name="confirm"
        label="Repeat the new password"
        testID="set-password-confirm"
        secret
        autoCapitalize="none"
        autoComplete="new-password"
        textContentType="newPassword"
        returnKeyType="go"
        onSubmitEditing={() => void onSubmit()}
      />
      {generalError ? <Notice message={generalError} testID="set-password-error" /> : null}
      <Button
        label="Save password and sign in"
        onPress={() => void onSubmit()}
        loading={setPassword.isPending}
        fullWidth
        testID="set-password-submit"
      />
    </AuthFrame>
  );
}
