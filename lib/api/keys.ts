/**
 * Every query key of the app, in one tree, so that what a change makes stale can be read off the
 * roots (the mutations use lib/api/invalidate.ts):
 *
 *   ['batches', 'list']
 *   ['batches', 'one', id, 'detail' | 'curves' | 'overlay' | 'characterisation' | 'evaluation' | 'reviews' | 'physics', …]   one batch
 *   ['batches', 'compare', { batches, specId, param }]   answers about several batches
 *   ['curves', id, 'detail' | 'physics']                 one curve (its physics follow its fits)
 *   ['physics', 'material' | 'band-diagram', …]          pure computations, never stale
 *   ['specs', …]  ['setups', …]  ['users', …]  ['outbox', …]  ['session', …]  ['strings', …]  ['stations', …]
 *
 * Evaluations, reviews and comparisons are answers about batches, so they sit under the batches
 * root; the resource files (batches.ts, quality.ts, physics.ts, …) re-export their factories.
 */
import type { BandDiagramRequest } from '@/lib/schemas/physics';
import type { CurveSortKey } from '@/lib/schemas/curves';

export type CurveListParams = { page: number; page_size: number; sort: CurveSortKey; dir: 'asc' | 'desc'; q: string; flag?: string };

/** The third element of a comparison key. */
export type CompareKeyPart = { batches: string[]; specId: string; param: string };

export const batchKeys = {
  all: ['batches'] as const,
  list: () => [...batchKeys.all, 'list'] as const,
  /** Everything cached about one batch. */
  one: (id: string) => [...batchKeys.all, 'one', id] as const,
  detail: (id: string) => [...batchKeys.one(id), 'detail'] as const,
  curvesOf: (id: string) => [...batchKeys.one(id), 'curves'] as const,
  curves: (id: string, p: CurveListParams) => [...batchKeys.curvesOf(id), p] as const,
  overlay: (id: string) => [...batchKeys.one(id), 'overlay'] as const,
  /** The characterisation of one device of the batch ('' = the device with the most curves). */
  characterisation: (id: string, device: string) => [...batchKeys.one(id), 'characterisation', device] as const,
  /** The batch's curves by fit status (queued jobs in PostgreSQL mode). */
  fits: (id: string) => [...batchKeys.one(id), 'fits'] as const,
  /** J0 and the implied Voc of every device of the batch (GET /api/physics/batches/:id). */
  physics: (id: string) => [...batchKeys.one(id), 'physics'] as const,
};

export const qualityKeys = {
  evaluation: (batchId: string, specId: string) => [...batchKeys.one(batchId), 'evaluation', specId] as const,
  reviews: (batchId: string) => [...batchKeys.one(batchId), 'reviews'] as const,
  /** Every comparison; each one's batches are in its key (see comparedBatches). */
  comparisons: () => [...batchKeys.all, 'compare'] as const,
  compare: (ids: string[], specId: string, param: string) => [...qualityKeys.comparisons(), { batches: ids, specId, param } satisfies CompareKeyPart] as const,
};

/** The batches of a comparison key; [] for any other key. */
export function comparedBatches(key: readonly unknown[]): string[] {
  if (key[0] !== batchKeys.all[0] || key[1] !== 'compare') return [];
  const part = key[2] as Partial<CompareKeyPart> | undefined;
  return Array.isArray(part?.batches) ? part.batches : [];
}

export const curveKeys = {
  all: ['curves'] as const,
  /** Everything cached about one curve. */
  one: (id: string) => [...curveKeys.all, id] as const,
  detail: (id: string) => [...curveKeys.one(id), 'detail'] as const,
  /** The physics of the curve's current fits (J0, implied Voc, Voc against temperature). */
  physics: (id: string) => [...curveKeys.one(id), 'physics'] as const,
};

export const physicsKeys = {
  all: ['physics'] as const,
  material: (temp_k: number, range: { from_k: number; to_k: number } | null = null) => [...physicsKeys.all, 'material', temp_k, range] as const,
  bandDiagram: (input: BandDiagramRequest | null) => [...physicsKeys.all, 'band-diagram', input ?? 'none'] as const,
  /** Under the curve's root: a refit of the curve makes it stale. */
  curve: (id: string, range: { from_c: number; to_c: number } | null = null) => (range ? ([...curveKeys.physics(id), range] as const) : curveKeys.physics(id)),
};

export const specKeys = {
  all: ['specs'] as const,
  list: () => [...specKeys.all, 'list'] as const,
  detail: (id: string) => [...specKeys.all, 'detail', id] as const,
};

export const setupKeys = {
  all: ['setups'] as const,
  list: () => [...setupKeys.all, 'list'] as const,
};

/** Everything the admins' users screen holds: members, invitations, requests to join, the setting, the record. */
export const userKeys = {
  all: ['users'] as const,
  list: () => [...userKeys.all, 'list'] as const,
  invitations: () => [...userKeys.all, 'invitations'] as const,
  requests: () => [...userKeys.all, 'requests'] as const,
  organisation: () => [...userKeys.all, 'organisation'] as const,
  audit: () => [...userKeys.all, 'audit'] as const,
};

export const outboxKeys = {
  all: ['outbox'] as const,
  list: () => [...outboxKeys.all, 'list'] as const,
};

/** The admins' stations screen: the organisation's station keys. */
export const stationKeys = {
  all: ['stations'] as const,
  list: () => [...stationKeys.all, 'list'] as const,
};

export const sessionKeys = {
  all: ['session'] as const,
  me: () => [...sessionKeys.all, 'me'] as const,
};

export const stringKeys = {
  all: ['strings'] as const,
  size: () => [...stringKeys.all, 'size'] as const,
};
