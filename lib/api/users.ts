/** The organisation's members, invitations, requests to join, joining setting and record (admins). */
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { apiFetch } from '@/lib/api/client';
import { invalidateMembership } from '@/lib/api/invalidate';
import { batchKeys, userKeys } from '@/lib/api/keys';
import type { AuditEntryJson } from '@/lib/auth/audit';
import type { Role } from '@/lib/auth/roles';
import type { InviteInput, RequestDecisionInput } from '@/lib/schemas/auth';
import type { UserList } from '@/lib/schemas/responses';

export type { OrgUser } from '@/lib/schemas/responses';
export type Invitation = { id: string; email: string; role: Role; expires_at: string; created_at: string; invited_by: string | null };
export type JoinRequest = { id: string; user_id: string; name: string; email: string; created_at: string };
export type OrganisationSettings = { id: string; name: string; domain: string; join_by_domain: boolean; separate_release: boolean; retention_years: number };

export { userKeys };

export function useUsers() {
  return useQuery({ queryKey: userKeys.list(), queryFn: () => apiFetch<UserList>('/api/users') });
}

export function useInvitations() {
  return useQuery({ queryKey: userKeys.invitations(), queryFn: () => apiFetch<{ invitations: Invitation[] }>('/api/invitations') });
}

export function useJoinRequests() {
  return useQuery({ queryKey: userKeys.requests(), queryFn: () => apiFetch<{ requests: JoinRequest[] }>('/api/membership-requests') });
}

export function useOrganisationSettings() {
  return useQuery({ queryKey: userKeys.organisation(), queryFn: () => apiFetch<OrganisationSettings>('/api/organization') });
}

export function useAudit() {
  return useQuery({ queryKey: userKeys.audit(), queryFn: () => apiFetch<{ entries: AuditEntryJson[] }>('/api/organization/audit') });
}

/** A mutation that changes membership: afterwards the users screen, the session and the outbox are stale. */
function useMembershipMutation<V>(fn: (v: V) => Promise<unknown>) {
  const qc = useQueryClient();
  return useMutation({ mutationFn: fn, onSuccess: () => invalidateMembership(qc) });
}

export function useChangeRole() {
  return useMembershipMutation((input: { userId: string; role: Role }) =>
    apiFetch(`/api/users/${encodeURIComponent(input.userId)}/role`, { method: 'PATCH', body: { role: input.role } }),
  );
}

export function useSetMemberActive() {
  return useMembershipMutation((input: { userId: string; active: boolean }) =>
    apiFetch(`/api/users/${encodeURIComponent(input.userId)}/active`, { method: 'PATCH', body: { active: input.active } }),
  );
}

export function useRemoveMember() {
  return useMembershipMutation((userId: string) => apiFetch(`/api/users/${encodeURIComponent(userId)}`, { method: 'DELETE' }));
}

export function useInvite() {
  return useMembershipMutation((input: InviteInput) => apiFetch('/api/invitations', { body: input }));
}

export function useCancelInvitation() {
  return useMembershipMutation((id: string) => apiFetch(`/api/invitations/${encodeURIComponent(id)}`, { method: 'DELETE' }));
}

export function useDecideRequest() {
  return useMembershipMutation((input: { id: string } & RequestDecisionInput) => {
    const { id, ...body } = input;
    return apiFetch(`/api/membership-requests/${encodeURIComponent(id)}/decision`, { body });
  });
}

export function useSetJoinByDomain() {
  return useMembershipMutation((on: boolean) => apiFetch('/api/organization', { method: 'PATCH', body: { join_by_domain: on } }));
}

/** Separation of duties at release on or off; every batch's release check changes with it. */
export function useSetSeparateRelease() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (on: boolean) => apiFetch('/api/organization', { method: 'PATCH', body: { separate_release: on } }),
    onSuccess: () => Promise.all([invalidateMembership(qc), qc.invalidateQueries({ queryKey: batchKeys.all })]),
  });
}
