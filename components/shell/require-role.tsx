import type { ReactNode } from 'react';
import { Screen } from '@/components/ui/screen';
import { Notice } from '@/components/ui/states';
import { useSession } from '@/hooks/use-session';
import { ERROR_SENTENCES } from '@/shared/api/errors';
import type { Role } from '@/shared/schemas/auth';

/** Hides a screen from roles that may not use it. The server refuses them as well. */
export function RequireRole({ roles, children }: { roles: readonly Role[]; children: ReactNode }) {
  const { user } = useSession();
  if (!user || !roles.includes(user.role)) {
    return (
      <Screen>
        <Notice message={ERROR_SENTENCES['auth/forbidden']} testID="forbidden" />
      </Screen>
    );
  }
  return <>{children}</>;
}
