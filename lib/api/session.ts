/** Session, sign-in and account hooks (better-auth's endpoints and /api/me). */
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { QueryClient } from '@tanstack/react-query';
import type { Account, AccountState, Me } from '@/lib/schemas/responses';
import { ApiError, apiFetch } from '@/lib/api/client';
import { outboxKeys, sessionKeys } from '@/lib/api/keys';
import type { SignInInput, SignUpInput } from '@/lib/schemas/auth';

export type { Account, AccountState, Me };

export { sessionKeys };

function isMember(a: Account | null): a is Me {
  return !!a && a.account_state === 'active' && !!a.organization && !!a.role;
}

async function fetchAccount(): Promise<Account | null> {
  try {
    return await apiFetch<Account>('/api/me');
  } catch (err) {
    if (err instanceof ApiError && err.status === 401) return null;
    throw err;
  }
}

/** The signed-in person whatever their state, or null when signed out (401). */
export function useAccount() {
  return useQuery({ queryKey: sessionKeys.me(), queryFn: fetchAccount, staleTime: 60_000 });
}

/** The signed-in active member, or null (signed out, or not yet let in: see useAccount). */
export function useMe() {
  return useQuery({ queryKey: sessionKeys.me(), queryFn: fetchAccount, staleTime: 60_000, select: (a) => (isMember(a) ? a : null) });
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

/** Sign-up signs nobody in: the answer is the same for a new and a taken address, and a mail follows. */
export function useSignUp() {
  return useMutation({
    mutationFn: (input: SignUpInput) => apiFetch('/api/auth/sign-up/email', { body: input }),
  });
}

/** Mails a new verification link to the signed-in person's address. */
export function useResendVerification() {
  return useMutation({
    mutationFn: (email: string) => apiFetch('/api/auth/send-verification-email', { body: { email } }),
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
