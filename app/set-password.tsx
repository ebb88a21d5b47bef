import { useLocalSearchParams } from 'expo-router';
import { SetPasswordScreen } from '@/components/auth/set-password-screen';
import { PageTitle } from '@/components/ui/page-title';

export default function SetPasswordRoute() {
  const { token } = useLocalSearchParams<{ token?: string }>();
  return (
    <>
      <PageTitle title="Choose a password" />
      <SetPasswordScreen token={token} />
    </>
  );
}
