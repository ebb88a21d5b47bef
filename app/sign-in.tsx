import { useLocalSearchParams } from 'expo-router';
import { SignInScreen } from '@/components/auth/sign-in-screen';
import { PageTitle } from '@/components/ui/page-title';

export default function SignInRoute() {
  const { next } = useLocalSearchParams<{ next?: string }>();
  return (
    <>
      <PageTitle title="Sign in" />
      <SignInScreen next={next} />
    </>
  );
}
