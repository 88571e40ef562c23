/** The organisation's sent mail (admins). */
import { useQuery } from '@tanstack/react-query';
import { apiFetch } from '@/lib/api/client';
import type { Outbox } from '@/lib/schemas/responses';
import { outboxKeys } from '@/lib/api/keys';

export type { OutboxMessage } from '@/lib/schemas/responses';

export { outboxKeys };

export function useOutbox() {
  return useQuery({ queryKey: outboxKeys.list(), queryFn: () => apiFetch<Outbox>('/api/outbox') });
}
