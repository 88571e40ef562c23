/** Session, sign-in and account hooks (better-auth's endpoints and /api/me). */
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { QueryClient } from '@tanstack/react-query';
import type { Me } from '@/lib/schemas/responses';
import { ApiError, apiFetch } from '@/lib/api/client';
import { outboxKeys, sessionKeys } from '@/lib/api/keys';
import type { SignInInput, SignUpInput } from '@/lib/schemas/auth';

export type { Me };

export { sessionKeys };

/** The signed-in user, or null when signed out (401). */
export function useMe() {
  return useQuery({
    queryKey: sessionKeys.me(),
    queryFn: async (): Promise<Me | null> => {
      try {
        return await apiFetch<Me>('/api/me');
      } catch (err) {
        if (err instanceof ApiError && err.status === 401) return null;
        throw err;
      }
    },
    staleTime: 60_000,
  });
}

/**
 * Another account signed in: what is cached belonged to the previous one (a session that ran out
 * and someone else signing in on the same browser), so it goes; the session is fetched again.
 */
async function afterAccountChange(qc: QueryClient): Promise<void> {
  qc.removeQueries({ predicate: (q) => q.queryKey[0] !== sessionKeys.all[0] });
  await qc.invalidateQueries({ queryKey: sessionKeys.all });
}

export function useSignIn() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: SignInInput) => apiFetch('/api/auth/sign-in/email', { body: input }),
    onSuccess: () => afterAccountChange(qc),
  });
}

export function useSignUp() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: SignUpInput) => apiFetch('/api/auth/sign-up/email', { body: input }),
    onSuccess: () => afterAccountChange(qc),
  });
}

export function useSignOut() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: () => apiFetch('/api/auth/sign-out', { method: 'POST', body: {} }),
    onSuccess: async () => {
      // Keep the session query (its observers drive the route guard) and drop everything else.
      qc.setQueryData(sessionKeys.me(), null);
      qc.removeQueries({ predicate: (q) => q.queryKey[0] !== sessionKeys.all[0] });
    },
  });
}

export function useRequestPasswordReset() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (email: string) =>
      apiFetch('/api/auth/request-password-reset', { body: { email, redirectTo: '/reset-password' } }),
    // The reset mail lands in the outbox (an admin may be looking at it).
    onSuccess: async () => {
      await qc.invalidateQueries({ queryKey: outboxKeys.all });
    },
  });
}

export function useResetPassword() {
  return useMutation({
    mutationFn: (input: { token: string; newPassword: string }) => apiFetch('/api/auth/reset-password', { body: input }),
  });
}
