import { Slot } from 'expo-router';
import { AppShell } from '@/components/shell/app-shell';
import { AuthGate } from '@/components/shell/auth-gate';

export default function SignedInLayout() {
  return (
    <AuthGate>
      <AppShell>
        <Slot />
      </AppShell>
    </AuthGate>
  );
}
