import { ForgotPasswordScreen } from '@/components/auth/forgot-password-screen';
import { PageTitle } from '@/components/ui/page-title';

export default function ForgotPasswordRoute() {
  return (
    <>
      <PageTitle title="Reset your password" />
      <ForgotPasswordScreen />
    </>
  );
}
