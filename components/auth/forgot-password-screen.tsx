import { zodResolver } from '@hookform/resolvers/zod';
import { useForm } from 'react-hook-form';
import { FormTextField } from '@/components/form/form-text-field';
import { applyServerFieldErrors } from '@/components/form/server-errors';
import { Button } from '@/components/ui/button';
import { Notice } from '@/components/ui/states';
import { TextLink } from '@/components/ui/text-link';
import { errorMessage, fieldErrors } from '@/hooks/api/api-client';
import { useForgotPasswordMutation } from '@/hooks/queries/auth';
import { ForgotPasswordSchema } from '@/shared/schemas/auth';
import { AuthFrame } from './auth-frame';

export const FORGOT_PASSWORD_SENT = 'If that address has an account, we sent a link.';

export function ForgotPasswordScreen() {
  const forgot = useForgotPasswordMutation();
  const { control, handleSubmit, setError } = useForm({
    resolver: zodResolver(ForgotPasswordSchema),
    defaultValues: { email: '' },
  });

  const onSubmit = handleSubmit((values) =>
    forgot.mutateAsync(values).catch((error: unknown) => {
      applyServerFieldErrors(error, setError, ['email']);
    }),
  );

  const failed = forgot.isError && Object.keys(fieldErrors(forgot.error)).length === 0 ? forgot.error : null;

  return (
    <AuthFrame
      title="Reset your password"
      intro="Enter the e-mail address you sign in with. We will send a link to choose a new password."
      footer={<TextLink href="/sign-in" label="Back to sign in" testID="forgot-back" />}
    >
      {forgot.isSuccess ? (
        <Notice tone="success" message={FORGOT_PASSWORD_SENT} testID="forgot-sent" />
      ) : (
        <>
          <FormTextField
            control={control}
            name="email"
            label="E-mail"
            testID="forgot-email"
            keyboardType="email-address"
            inputMode="email"
            autoCapitalize="none"
            autoCorrect={false}
            autoComplete="email"
            returnKeyType="send"
            onSubmitEditing={() => void onSubmit()}
          />
          {failed ? <Notice message={errorMessage(failed)} testID="forgot-error" /> : null}
          <Button label="Send the link" onPress={() => void onSubmit()} loading={forgot.isPending} fullWidth testID="forgot-submit" />
        </>
      )}
    </AuthFrame>
  );
}
