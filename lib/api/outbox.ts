/** The organisation's sent mail (admins). */
import { useQuery } from '@tanstack/react-query';
import { apiFetch } from '@/lib/api/client';
import { outboxKeys } from '@/lib/api/keys';

export type OutboxMessage = { id: string; to: string; subject: string; body: string; kind: string; transport: string; createdAt: string };

export { outboxKeys };

export function useOutbox() {
  return useQuery({ queryKey: outboxKeys.list(), queryFn: () => apiFetch<{ messages: OutboxMessage[] }>('/api/outbox') });
}
