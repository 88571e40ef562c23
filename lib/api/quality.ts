/** Specs, evaluations, reviews and comparisons. */
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { ApiError, apiFetch } from '@/lib/api/client';
import { invalidateBatchReview } from '@/lib/api/invalidate';
import { qualityKeys, specKeys } from '@/lib/api/keys';
import type { ComparisonWire, Evaluation, ReviewRecord, SpecJson, SpecList } from '@/lib/schemas/responses';
import { rowsOfColumns } from '@/lib/quality/compare-table';
import type { CompareRow } from '@/lib/quality/compare-table';
import type { SpecInput } from '@/lib/quality/spec';

export type { DeviceEval, Difference, Evaluation, ReleaseCheck, ReleaseSummary, Review, ReviewRecord, SpecJson } from '@/lib/schemas/responses';

/** The 409 answer to a spec saved on an outdated version: the newer version and what it changed. */
export type SpecConflict = { code: 'spec_conflict'; message: string; newer: { id: string; version: number; changes: string[]; spec: SpecJson } };

/** The conflict carried by a failed spec save, if that is what it was. */
export function specConflictOf(error: unknown): SpecConflict | null {
  const body = error instanceof ApiError ? (error.body as Partial<SpecConflict> | undefined) : undefined;
  return body?.code === 'spec_conflict' && body.newer ? (body as SpecConflict) : null;
}

export type { CompareRow };
/** The comparison as the grid uses it: the wire answer with its rows as objects again. */
export type Comparison = Omit<ComparisonWire, 'tables' | 'outliers'> & { rows: CompareRow[] };
export type { ComparisonWire };

/** The wire answer with its rows as objects again, as the grid, filters and charts use them. */
export function comparisonOfWire(w: ComparisonWire): Comparison {
  const { tables, outliers, ...rest } = w;
  return { ...rest, rows: rowsOfColumns(tables, outliers, w.batches) };
}

export { qualityKeys, specKeys };

export function useSpecs() {
  return useQuery({ queryKey: specKeys.list(), queryFn: () => apiFetch<SpecList>('/api/specs') });
}

export function useSpec(id: string) {
  return useQuery({ queryKey: specKeys.detail(id), queryFn: () => apiFetch<SpecJson>(`/api/specs/${encodeURIComponent(id)}`), enabled: !!id });
}

export function useSaveSpec() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: SpecInput & { family_id?: string; base_version?: number }) => apiFetch<SpecJson>('/api/specs', { body: input as Record<string, unknown> }),
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
    mutationFn: (input: { decision: 'release' | 'hold'; spec_id: string; comment: string }) => apiFetch(`/api/batches/${encodeURIComponent(batchId)}/decision`, { body: input }),
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

/** The release report (PDF) of a batch against a spec version; a released batch's comes from its release record. */
export function reportUrl(batchId: string, specId: string): string {
  return `/api/batches/${encodeURIComponent(batchId)}/report.pdf?spec=${encodeURIComponent(specId)}`;
}

/** The pass/fail CSV's address (downloaded by the browser with the session cookie). */
export function passFailUrl(batchId: string, specId: string): string {
  return `/api/batches/${encodeURIComponent(batchId)}/pass-fail.csv?spec=${encodeURIComponent(specId)}`;
}
