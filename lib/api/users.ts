/** Organisation users and roles (admins). */
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { apiFetch } from '@/lib/api/client';
import type { Role } from '@/lib/auth/roles';

export type OrgUser = { id: string; name: string; email: string; role: Role; memberId: string; joinedAt: string };

export const userKeys = {
  all: ['users'] as const,
  list: () => [...userKeys.all, 'list'] as const,
};

export function useUsers() {
  return useQuery({ queryKey: userKeys.list(), queryFn: () => apiFetch<{ users: OrgUser[] }>('/api/users') });
}

export function useChangeRole() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: { userId: string; role: Role }) =>
      apiFetch(`/api/users/${encodeURIComponent(input.userId)}/role`, { method: 'PATCH', body: { role: input.role } }),
    onSuccess: async () => {
      await qc.invalidateQueries({ queryKey: userKeys.all });
    },
  });
}
