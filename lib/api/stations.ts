/** The organisation's test stations and their keys (admins): list, create (the key shown once), revoke. */
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { apiFetch } from '@/lib/api/client';
import { stationKeys } from '@/lib/api/keys';
import type { StationCreated, StationList } from '@/lib/schemas/stations';

export type { Station, StationCreated } from '@/lib/schemas/stations';
export { stationKeys };

export function useStations() {
  return useQuery({ queryKey: stationKeys.list(), queryFn: () => apiFetch<StationList>('/api/stations') });
}

/** Creates a station; the answer holds its key, which no later request shows again. */
export function useCreateStation() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (name: string) => apiFetch<StationCreated>('/api/stations', { body: { name } }),
    onSuccess: () => qc.invalidateQueries({ queryKey: stationKeys.all }),
  });
}

export function useRevokeStation() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (id: string) => apiFetch(`/api/stations/${encodeURIComponent(id)}`, { method: 'DELETE' }),
    onSuccess: () => qc.invalidateQueries({ queryKey: stationKeys.all }),
  });
}
