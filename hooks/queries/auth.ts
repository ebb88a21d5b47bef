import { useMutation } from '@tanstack/react-query';
import { apiRequest } from '@/hooks/api/api-client';
import { useSession } from '@/hooks/use-session';
import { API } from '@/shared/api/paths';
import { SignInResponseSchema, type SetPassword } from '@/shared/schemas/auth';

export function useForgotPasswordMutation() {
  return useMutation({
    mutationFn: (body: { email: string }) =>
      apiRequest(API.forgotPassword, { method: 'POST', body, auth: false }),
  });
}

/** Invitations and resets both end here; the answer is a session, like a sign-in. */
export function useSetPasswordMutation() {
  const { adopt } = useSession();
  return useMutation({
    mutationFn: (body: SetPassword) =>
      apiRequest(API.setPassword, { method: 'POST', body, auth: false, schema: SignInResponseSchema }),
    onSuccess: (session) => adopt(session),
  });
}
