/** Batches, their curves, uploads and refits. */
import { keepPreviousData, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { useEffect, useRef } from 'react';
import { ApiError, apiFetch } from '@/lib/api/client';
import { invalidateBatchData, invalidateBatchFigures } from '@/lib/api/invalidate';
import { batchKeys, curveKeys } from '@/lib/api/keys';
import type { CurveListParams } from '@/lib/api/keys';
import type { BatchCreateInput, RefitInput } from '@/lib/schemas/curves';
import type { Batch, BatchList, CurveDetail, CurvePage, CurveRow, FitStatus, Overlay, RefitAnswer, UploadFileResult } from '@/lib/schemas/responses';

export { batchKeys, curveKeys };
export type { CurveListParams };

export type { Batch, CurveDetail, CurvePageRow, CurveRow, DescribeStats, OverlayCurve, UploadFileResult } from '@/lib/schemas/responses';
export type FitJson = CurveRow['fits'][number];

export function useBatches() {
  return useQuery({ queryKey: batchKeys.list(), queryFn: () => apiFetch<BatchList>('/api/batches') });
}

export function useBatch(id: string) {
  return useQuery({ queryKey: batchKeys.detail(id), queryFn: () => apiFetch<Batch>(`/api/batches/${encodeURIComponent(id)}`), enabled: !!id });
}

export function useBatchCurves(id: string, p: CurveListParams) {
  const qs = new URLSearchParams({ page: String(p.page), page_size: String(p.page_size), sort: p.sort, dir: p.dir, q: p.q, ...(p.flag ? { flag: p.flag } : {}) });
  return useQuery({
    queryKey: batchKeys.curves(id, p),
    queryFn: () => apiFetch<CurvePage>(`/api/batches/${encodeURIComponent(id)}/curves?${qs}`),
    placeholderData: keepPreviousData,
    enabled: !!id,
  });
}

export function useOverlay(id: string) {
  return useQuery({
    queryKey: batchKeys.overlay(id),
    queryFn: () => apiFetch<Overlay>(`/api/batches/${encodeURIComponent(id)}/overlay?max=30`),
    enabled: !!id,
  });
}

/** Fit progress of a batch; asked again every 2 s while any fit is queued or running, and the batch's figures as fits land. */
export function useFitStatus(id: string) {
  const qc = useQueryClient();
  const q = useQuery({
    queryKey: batchKeys.fits(id),
    queryFn: () => apiFetch<FitStatus>(`/api/batches/${encodeURIComponent(id)}/fits`),
    enabled: !!id,
    refetchInterval: (query) => (query.state.data && query.state.data.counts.queued + query.state.data.counts.fitting > 0 ? 2000 : false),
  });
  const seen = useRef<FitStatus | undefined>(undefined);
  useEffect(() => {
    const before = seen.current;
    seen.current = q.data;
    // Only while fits were on their way (never in embedded mode, where an upload answers with them done).
    if (!before || !q.data || before.counts.queued + before.counts.fitting === 0) return;
    if (before.counts.done !== q.data.counts.done || before.counts.failed !== q.data.counts.failed) void invalidateBatchData(qc, id);
  }, [q.data, qc, id]);
  return q;
}

/** Cancels the batch's fits that have not started. */
export function useCancelFits(id: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: () => apiFetch<FitStatus>(`/api/batches/${encodeURIComponent(id)}/fits/cancel`, { method: 'POST', body: {} }),
    onSuccess: async (answer) => {
      qc.setQueryData(batchKeys.fits(id), answer);
      await invalidateBatchData(qc, id);
    },
  });
}

export function useCreateBatch() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: BatchCreateInput) => apiFetch<Batch>('/api/batches', { body: input as Record<string, unknown> }),
    onSuccess: async () => {
      await qc.invalidateQueries({ queryKey: batchKeys.list() });
    },
  });
}

export function useUpdateBatch(id: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: Partial<BatchCreateInput> & { archived?: boolean }) => apiFetch<Batch>(`/api/batches/${encodeURIComponent(id)}`, { method: 'PATCH', body: input as Record<string, unknown> }),
    // A new name or archiving shows in the list, the comparisons and the batch's curve pages.
    onSuccess: async () => {
      await invalidateBatchData(qc, id);
    },
  });
}

export function useCurve(id: string) {
  return useQuery({
    queryKey: curveKeys.detail(id),
    queryFn: () => apiFetch<CurveDetail>(`/api/curves/${encodeURIComponent(id)}`),
    enabled: !!id,
    // A curve whose fits are queued or running is asked again until they land.
    refetchInterval: (q) => (q.state.data && (q.state.data.status === 'queued' || q.state.data.status === 'fitting') ? 2000 : false),
  });
}

export function useRefit(id: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: RefitInput) => apiFetch<RefitAnswer>(`/api/curves/${encodeURIComponent(id)}/refit`, { body: input as Record<string, unknown> }),
    onSuccess: async (data) => {
      // The answer is the new curve (without its batch): written, not fetched again, as it can hold 100,000 points.
      qc.setQueryData(curveKeys.detail(id), (old: CurveDetail | undefined) => (old ? { ...data, batch: old.batch, original: old.original } : old));
      // The physics of this curve (J0, Voc vs T) follow the new fit; the batch's figures follow its curves.
      await Promise.all([qc.invalidateQueries({ queryKey: curveKeys.physics(id) }), invalidateBatchFigures(qc, data.batch_id)]);
    },
  });
}

export type UploadOptions = { temp_c?: string; irradiance_w_m2?: string; cells?: string; area_cm2?: string; on_duplicate?: 'ask' | 'replace' | 'keep' };

/** Files per request: small enough that progress moves and one failure costs little. */
export const UPLOAD_CHUNK = 40;

/**
 * Sends files in chunks with XMLHttpRequest (fetch has no upload progress), reporting the share
 * done as files are sent and fitted. Resolves with every file's result, in order.
 */
export async function uploadFiles(
  batchId: string,
  files: { name: string; blob: Blob }[],
  options: UploadOptions,
  onProgress: (done: number, total: number, phase: 'sending' | 'fitting') => void,
  signal?: AbortSignal,
): Promise<UploadFileResult[]> {
  const results: UploadFileResult[] = [];
  for (let start = 0; start < files.length; start += UPLOAD_CHUNK) {
    const chunk = files.slice(start, start + UPLOAD_CHUNK);
    const form = new FormData();
    for (const [k, v] of Object.entries(options)) if (v !== undefined && v !== '') form.append(k, v);
    for (const f of chunk) form.append('files', f.blob, f.name);
    const body = await new Promise<{ results: UploadFileResult[] }>((resolve, reject) => {
      const xhr = new XMLHttpRequest();
      xhr.open('POST', `/api/batches/${encodeURIComponent(batchId)}/curves`);
      xhr.withCredentials = true;
      xhr.upload.onprogress = (e) => {
        if (e.lengthComputable) onProgress(start + (chunk.length * e.loaded) / e.total * 0.5, files.length, e.loaded < e.total ? 'sending' : 'fitting');
      };
      xhr.onload = () => {
        let data: { results?: UploadFileResult[]; code?: string; message?: string } = {};
        try {
          data = JSON.parse(xhr.responseText);
        } catch {
          /* not JSON */
        }
        if (xhr.status >= 200 && xhr.status < 300 && data.results) resolve({ results: data.results });
        else if (xhr.status === 422 && data.results) resolve({ results: data.results });
        else reject(new ApiError(xhr.status, data.code ?? `http_${xhr.status}`, data.message ?? `The upload failed (${xhr.status}).`));
      };
      xhr.onerror = () => reject(new ApiError(0, 'network', 'The upload was interrupted. Files already answered are stored; send the rest again.'));
      if (signal) signal.addEventListener('abort', () => xhr.abort());
      xhr.send(form);
    });
    results.push(...body.results);
    onProgress(start + chunk.length, files.length, 'fitting');
  }
  return results;
}

/** Invalidates what an upload changes: the batch as a whole (lib/api/invalidate.ts). */
export function useAfterUpload(batchId: string) {
  const qc = useQueryClient();
  return () => invalidateBatchData(qc, batchId);
}
