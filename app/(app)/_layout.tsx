import { Slot } from 'expo-router';
import { AppShell } from '@/components/shell/app-shell';
import { AuthGate } from '@/components/shell/auth-gate';
import { OfflineBanner } from '@/components/shell/offline-banner';

export default function SignedInLayout() {
  return (
    <AuthGate>
      <AppShell>
        <OfflineBanner />
        <Slot />
      </AppShell>
    </AuthGate>
  );
}
