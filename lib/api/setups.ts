/** Measurement setups and their uncertainty budgets (GET/POST/PATCH /api/setups). */
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { apiFetch } from '@/lib/api/client';
import { batchKeys, curveKeys, setupKeys } from '@/lib/api/keys';
import type { SetupInput } from '@/lib/quality/uncertainty';
import type { Setup, SetupList } from '@/lib/schemas/responses';

export type { Setup, SetupComponent, SetupList } from '@/lib/schemas/responses';
export { setupKeys };

export function useSetups() {
  return useQuery({ queryKey: setupKeys.list(), queryFn: () => apiFetch<SetupList>('/api/setups') });
}

/** Creates a setup (no id) or edits one (PATCH with its id). */
export function useSaveSetup() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ id, ...input }: SetupInput & { id?: string }) =>
      id
        ? apiFetch<Setup>(`/api/setups/${encodeURIComponent(id)}`, { method: 'PATCH', body: input as Record<string, unknown> })
        : apiFetch<Setup>('/api/setups', { body: input as Record<string, unknown> }),
    // A budget gives every figure of the batches measured with it its uncertainty, so every
    // answer about batches (evaluations, comparisons, pages) may change with it.
    onSuccess: async () => {
      await Promise.all([qc.invalidateQueries({ queryKey: setupKeys.all }), qc.invalidateQueries({ queryKey: batchKeys.all }), qc.invalidateQueries({ queryKey: curveKeys.all })]);
    },
  });
}
