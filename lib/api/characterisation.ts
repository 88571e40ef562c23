/** A device type's characterisation from a batch's curves (GET /api/batches/:id/characterisation). */
import { useQuery } from '@tanstack/react-query';
import { apiFetch } from '@/lib/api/client';
import { batchKeys } from '@/lib/api/keys';
import type { CharacterisationAnswer } from '@/lib/schemas/characterisation-answer';

export type { CharacterisationAnswer };
export type { Characterisation } from '@/lib/analysis/characterise';

/** The characterisation of `device` (empty: the device with the most curves); the engine's fits take a few seconds. */
export function useCharacterisation(batchId: string, device: string) {
  return useQuery({
    queryKey: batchKeys.characterisation(batchId, device),
    queryFn: () => apiFetch<CharacterisationAnswer>(`/api/batches/${encodeURIComponent(batchId)}/characterisation${device ? `?device=${encodeURIComponent(device)}` : ''}`),
    enabled: !!batchId,
    staleTime: 60_000,
  });
}
