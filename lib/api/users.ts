/** Organisation users and roles (admins). */
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { apiFetch } from '@/lib/api/client';
import { sessionKeys, userKeys } from '@/lib/api/keys';
import type { Role } from '@/lib/auth/roles';
import type { UserList } from '@/lib/schemas/responses';

export type { OrgUser } from '@/lib/schemas/responses';

export { userKeys };

export function useUsers() {
  return useQuery({ queryKey: userKeys.list(), queryFn: () => apiFetch<UserList>('/api/users') });
}

export function useChangeRole() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: { userId: string; role: Role }) =>
      apiFetch(`/api/users/${encodeURIComponent(input.userId)}/role`, { method: 'PATCH', body: { role: input.role } }),
    // An admin may change their own role, and with it what /api/me permits (the server drops its cached caller).
    onSuccess: async () => {
      await Promise.all([qc.invalidateQueries({ queryKey: userKeys.all }), qc.invalidateQueries({ queryKey: sessionKeys.me() })]);
    },
  });
}
