/** The raw-data archive from the screens: download addresses, re-analysis, the administrator's check and deletion, retention. */
import { useMutation, useQueryClient } from '@tanstack/react-query';
import { apiFetch } from '@/lib/api/client';
import { invalidateBatchData, invalidateBatchFigures, invalidateMembership } from '@/lib/api/invalidate';
import { curveKeys, userKeys } from '@/lib/api/keys';
import type { CurveDetail, OriginalsCheck } from '@/lib/schemas/responses';

/** The curve's file as uploaded (a download: name, type and bytes). */
export const originalUrl = (curveId: string) => `/api/curves/${encodeURIComponent(curveId)}/original`;
/** Every original of the batch and manifest.csv, as one zip. */
export const originalsZipUrl = (batchId: string) => `/api/batches/${encodeURIComponent(batchId)}/originals.zip`;

/** Re-read the curve's original with the current reader and fits: the answer is the new curve; the batch's figures follow. */
export function useReanalyse(id: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: () => apiFetch<CurveDetail>(`/api/curves/${encodeURIComponent(id)}/reanalyse`, { body: {} }),
    onSuccess: async (data) => {
      qc.setQueryData(curveKeys.detail(id), data);
      await Promise.all([qc.invalidateQueries({ queryKey: curveKeys.physics(id) }), invalidateBatchFigures(qc, data.batch_id)]);
    },
  });
}

/** Re-hash the batch's kept originals (changes nothing). */
export function useVerifyOriginals(batchId: string) {
  return useMutation({ mutationFn: () => apiFetch<OriginalsCheck>(`/api/batches/${encodeURIComponent(batchId)}/originals/verify`, { body: {} }) });
}

/** Delete the batch's kept originals: its curves' pages and the audit record change. */
export function useDeleteOriginals(batchId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: () => apiFetch<{ batch_id: string; deleted: number; deleted_at: string }>(`/api/batches/${encodeURIComponent(batchId)}/originals`, { method: 'DELETE' }),
    onSuccess: () => Promise.all([invalidateBatchData(qc, batchId), qc.invalidateQueries({ queryKey: userKeys.audit() })]),
  });
}

/** Years the originals of a released batch are kept (the organisation's setting). */
export function useSetRetention() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (years: number) => apiFetch('/api/organization', { method: 'PATCH', body: { retention_years: years } }),
    onSuccess: () => invalidateMembership(qc),
  });
}
