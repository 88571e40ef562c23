/** Batches, their curves, uploads and refits. */
import { keepPreviousData, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { ApiError, apiFetch } from '@/lib/api/client';
import { invalidateBatchData, invalidateBatchFigures } from '@/lib/api/invalidate';
import { batchKeys, curveKeys } from '@/lib/api/keys';
import type { CurveListParams } from '@/lib/api/keys';
import type { CurveMeta, FitResult, Flag, Metrics } from '@/lib/iv/types';
import type { BatchCreateInput, RefitInput, StcFigures } from '@/lib/schemas/curves';

export { batchKeys, curveKeys };
export type { CurveListParams };

export type DescribeStats = { n: number; mean: number; sd: number | null; min: number; p5: number; median: number; p95: number; max: number; cpk: number | null };

export type Batch = {
  id: string;
  name: string;
  productType: string | null;
  supplier: string | null;
  line: string | null;
  lot: string | null;
  batchDate: string | null;
  cells: number | null;
  area_cm2: number | null;
  nameplate_w: number | null;
  description: string | null;
  archived: boolean;
  state: 'open' | 'in_review' | 'released' | 'on_hold';
  createdAt: string;
  updatedAt: string;
  curveCount?: number;
  meanPmp_w?: number | null;
  summary?: Record<string, DescribeStats | null>;
  flagCounts?: Record<string, number>;
};

export type FitJson = FitResult & { fit_id: string; conditions: Record<string, unknown>; reason: string; created_at: string };

export type CurveRow = {
  id: string;
  batch_id: string;
  device_id: string;
  file_name: string;
  meta: CurveMeta;
  metrics: Metrics;
  flags: Flag[];
  stc: StcFigures | null;
  fits: FitJson[];
  created_at: string;
};

export type CurveDetail = CurveRow & {
  points: { voltage_V: number[]; current_A: number[] };
  notes: string[];
  history: { fit_id: string; model: string; current: boolean; reason: string; conditions: Record<string, unknown>; rmse_a: number | null; converged: boolean; created_at: string }[];
  batch: { id: string; name: string; state: string };
};

export function useBatches() {
  return useQuery({ queryKey: batchKeys.list(), queryFn: () => apiFetch<{ batches: Batch[] }>('/api/batches') });
}

export function useBatch(id: string) {
  return useQuery({ queryKey: batchKeys.detail(id), queryFn: () => apiFetch<Batch>(`/api/batches/${encodeURIComponent(id)}`), enabled: !!id });
}

export function useBatchCurves(id: string, p: CurveListParams) {
  const qs = new URLSearchParams({ page: String(p.page), pageSize: String(p.pageSize), sort: p.sort, dir: p.dir, q: p.q, ...(p.flag ? { flag: p.flag } : {}) });
  return useQuery({
    queryKey: batchKeys.curves(id, p),
    queryFn: () => apiFetch<{ curves: CurveRow[]; total: number; page: number; pageSize: number }>(`/api/batches/${encodeURIComponent(id)}/curves?${qs}`),
    placeholderData: keepPreviousData,
    enabled: !!id,
  });
}

export type OverlayCurve = { id: string; device_id: string; flagged: boolean; voltage_V: number[]; current_A: number[] };

export function useOverlay(id: string) {
  return useQuery({
    queryKey: batchKeys.overlay(id),
    queryFn: () => apiFetch<{ total: number; sampled: number; curves: OverlayCurve[] }>(`/api/batches/${encodeURIComponent(id)}/overlay?max=30`),
    enabled: !!id,
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
  return useQuery({ queryKey: curveKeys.detail(id), queryFn: () => apiFetch<CurveDetail>(`/api/curves/${encodeURIComponent(id)}`), enabled: !!id });
}

export function useRefit(id: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: RefitInput) => apiFetch<CurveDetail>(`/api/curves/${encodeURIComponent(id)}/refit`, { body: input as Record<string, unknown> }),
    onSuccess: async (data) => {
      // The answer is the new curve (without its batch): written, not fetched again, as it can hold 100,000 points.
      qc.setQueryData(curveKeys.detail(id), (old: CurveDetail | undefined) => (old ? { ...data, batch: old.batch } : old));
      // The physics of this curve (J0, Voc vs T) follow the new fit; the batch's figures follow its curves.
      await Promise.all([qc.invalidateQueries({ queryKey: curveKeys.physics(id) }), invalidateBatchFigures(qc, data.batch_id)]);
    },
  });
}

export type UploadFileResult =
  | { file: string; accepted: true; curveId: string; deviceId: string; replaced?: number }
  | { file: string; accepted: false; error: string; code: string; deviceId?: string; line?: number };

export type UploadOptions = { tempC?: string; irradiance_Wm2?: string; cells?: string; area_cm2?: string; onDuplicate?: 'ask' | 'replace' | 'keep' };

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
