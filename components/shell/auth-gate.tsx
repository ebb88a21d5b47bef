import { Redirect, usePathname } from 'expo-router';
import type { ReactNode } from 'react';
import { Platform, StyleSheet, View } from 'react-native';
import { ErrorState, LoadingState } from '@/components/ui/states';
import { colors, spacing } from '@/components/theme/tokens';
import { errorMessage } from '@/hooks/api/api-client';
import { useSession } from '@/hooks/use-session';

function currentPath(pathname: string): string {
  const search = Platform.OS === 'web' && typeof window !== 'undefined' ? window.location.search : '';
  return `${pathname}${search}`;
}

/** Signed-out visitors go to sign in and come back to the page they asked for. */
export function AuthGate({ children }: { children: ReactNode }) {
  const pathname = usePathname();
  const { status, signedOutByUser, meError, retryMe } = useSession();

  if (status === 'signed-out') {
    const path = currentPath(pathname);
    const href = signedOutByUser || path === '/' ? '/sign-in' : `/sign-in?next=${encodeURIComponent(path)}`;
    return <Redirect href={href} />;
  }
  if (status === 'loading') {
    return (
      <View style={styles.center}>
        <LoadingState label="Opening Proofyard…" />
      </View>
    );
  }
  if (status === 'error') {
    return (
      <View style={styles.center}>
        <ErrorState message={errorMessage(meError)} onRetry={retryMe} />
      </View>
    );
  }
  return <>{children}</>;
}

const styles = StyleSheet.create({
  center: {
    flex: 1,
    backgroundColor: colors.bg,
    justifyContent: 'center',
    padding: spacing.lg,
  },
});
