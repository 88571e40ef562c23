/** Specs, evaluations, reviews and comparisons. */
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { ApiError, apiFetch } from '@/lib/api/client';
import { invalidateBatchReview } from '@/lib/api/invalidate';
import { qualityKeys, specKeys } from '@/lib/api/keys';
import type { Batch, DescribeStats } from '@/lib/api/batches';
import { rowsOfColumns } from '@/lib/quality/compare-table';
import type { BatchColumns, CompareRow } from '@/lib/quality/compare-table';
import type { Spec, SpecInput } from '@/lib/quality/spec';

export type SpecJson = Spec & { id: string; familyId: string; version: number; changes: string[]; createdAt: string; versions?: { id: string; version: number; changes: string[]; createdAt: string; by: string | null }[] };

export type DeviceEval = {
  deviceId: string;
  curveId: string;
  result: 'pass' | 'fail';
  reasons: { kind: string; param: string; value: number | string | null; message: string }[];
  powerClass: string | null;
  outlier: boolean;
  outlierParams: string[];
  values: Record<string, number | null>;
  flags: string[];
};

export type Evaluation = {
  batch: Batch;
  spec: { id: string; name: string; version: number; familyId: string };
  counts: { total: number; pass: number; fail: number; outliers: number };
  powerClassCounts: Record<string, number>;
  stats: Record<string, DescribeStats | null>;
  devices: DeviceEval[];
};

export type Review = { id: string; action: string; specId: string | null; counts: Record<string, number> | null; comment: string | null; createdAt: string; actor: string | null; release_id: string | null };

/** A release as listed: what it froze, and where its pass/fail CSV stays downloadable. */
export type ReleaseSummary = {
  id: string;
  revision: number;
  spec_id: string | null;
  spec_name: string;
  spec_version: number;
  counts: Record<string, number>;
  comment: string | null;
  released_by: string | null;
  created_at: string;
  csv_file_name: string;
  csv_sha256: string;
  csv_url: string;
};

/** Whether the caller may release the batch (separation of duties), with the reason when not. */
export type ReleaseCheck = { allowed: true } | { allowed: false; code: 'same_person'; message: string };

export type ReviewRecord = { reviews: Review[]; releases: ReleaseSummary[]; release_check: ReleaseCheck };

/** The 409 answer to a spec saved on an outdated version: the newer version and what it changed. */
export type SpecConflict = { code: 'spec_conflict'; message: string; newer: { id: string; version: number; changes: string[]; spec: SpecJson } };

/** The conflict carried by a failed spec save, if that is what it was. */
export function specConflictOf(error: unknown): SpecConflict | null {
  const body = error instanceof ApiError ? (error.body as Partial<SpecConflict> | undefined) : undefined;
  return body?.code === 'spec_conflict' && body.newer ? (body as SpecConflict) : null;
}

export type { CompareRow };
export type Difference = { batchA: string; batchB: string; param: string; difference?: number; ciLow?: number; ciHigh?: number; p?: number; dof?: number; sentence?: string; significant?: boolean; error?: string };
export type Comparison = {
  batches: { id: string; name: string; state: string; count: number }[];
  spec: { id: string; name: string; version: number } | null;
  param: string;
  rows: CompareRow[];
  stats: Record<string, Record<string, DescribeStats | null>>;
  counts: Record<string, { total: number; pass: number; fail: number; outliers: number } | null>;
  differences: Difference[];
};
/** The comparison as the server sends it: each batch's rows as columns, outlier marks apart (lib/quality/compare-table.ts). */
export type ComparisonWire = Omit<Comparison, 'rows'> & { tables: BatchColumns[]; outliers: (boolean | null)[][] };

/** The wire answer with its rows as objects again, as the grid, filters and charts use them. */
export function comparisonOfWire(w: ComparisonWire): Comparison {
  const { tables, outliers, ...rest } = w;
  return { ...rest, rows: rowsOfColumns(tables, outliers, w.batches) };
}

export { qualityKeys, specKeys };

export function useSpecs() {
  return useQuery({ queryKey: specKeys.list(), queryFn: () => apiFetch<{ specs: SpecJson[] }>('/api/specs') });
}

export function useSpec(id: string) {
  return useQuery({ queryKey: specKeys.detail(id), queryFn: () => apiFetch<SpecJson>(`/api/specs/${encodeURIComponent(id)}`), enabled: !!id });
}

export function useSaveSpec() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: SpecInput & { familyId?: string; base_version?: number }) => apiFetch<SpecJson>('/api/specs', { body: input as Record<string, unknown> }),
    // A save adds a version with a new id: evaluations and comparisons cached under an existing
    // spec id stay true, only the spec list and details change.
    onSuccess: async () => {
      await qc.invalidateQueries({ queryKey: specKeys.all });
    },
  });
}

export function useEvaluation(batchId: string, specId: string) {
  return useQuery({
    queryKey: qualityKeys.evaluation(batchId, specId),
    queryFn: () => apiFetch<Evaluation>(`/api/batches/${encodeURIComponent(batchId)}/evaluation?spec=${encodeURIComponent(specId)}`),
    enabled: !!batchId && !!specId,
  });
}

export function useReviews(batchId: string) {
  return useQuery({ queryKey: qualityKeys.reviews(batchId), queryFn: () => apiFetch<ReviewRecord>(`/api/batches/${encodeURIComponent(batchId)}/reviews`) });
}

export function useSubmitBatch(batchId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (comment: string) => apiFetch(`/api/batches/${encodeURIComponent(batchId)}/submit`, { body: { comment } }),
    // The state changes everywhere the batch shows, a review is recorded and the QA leads are mailed.
    onSuccess: async () => {
      await invalidateBatchReview(qc, batchId);
    },
  });
}

export function useDecision(batchId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: { decision: 'release' | 'hold'; specId: string; comment: string }) => apiFetch(`/api/batches/${encodeURIComponent(batchId)}/decision`, { body: input }),
    // Released or on hold shows in the list, the comparison and the curve pages; the decision is mailed.
    onSuccess: async () => {
      await invalidateBatchReview(qc, batchId);
    },
  });
}

/** A QA lead reopens a released batch with a written reason; it goes on hold as a new revision. */
export function useReopen(batchId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (reason: string) => apiFetch(`/api/batches/${encodeURIComponent(batchId)}/reopen`, { body: { reason } }),
    // Like a decision: the state shows in the list, the comparison and the curve pages; the record grows.
    onSuccess: async () => {
      await invalidateBatchReview(qc, batchId);
    },
  });
}

export function useComparison(ids: string[], specId: string, param: string) {
  const qs = new URLSearchParams({ batches: ids.join(','), param, ...(specId ? { spec: specId } : {}) });
  return useQuery({
    queryKey: qualityKeys.compare(ids, specId, param),
    queryFn: async () => comparisonOfWire(await apiFetch<ComparisonWire>(`/api/compare?${qs}`)),
    enabled: ids.length > 0,
  });
}

/** The pass/fail CSV's address (downloaded by the browser with the session cookie). */
export function passFailUrl(batchId: string, specId: string): string {
  return `/api/batches/${encodeURIComponent(batchId)}/pass-fail.csv?spec=${encodeURIComponent(specId)}`;
}
