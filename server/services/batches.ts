/**
 * Batches: the caller's batch or 404, the writable check, the API shape, creating and editing.
 * The cached read answers (list, summary, pages, overlay) are in batch-reads.ts.
 */
import { and, eq } from 'drizzle-orm';
import type { Db } from '@/db/client';
import { batch } from '@/db/schema';
import type { FileDefaults } from '@/lib/analysis/analyse-file';
import type { StcCoefficients } from '@/lib/analysis/stc';
import type { batchCreateSchema, batchUpdateSchema } from '@/lib/schemas/curves';
import type { BatchOut } from '@/lib/schemas/responses';
import { HttpError, notFound } from '@/server/errors';
import { touchBatch } from '@/server/services/answer-cache';
import { assertSetupOf } from '@/server/services/setups';

export type BatchRow = typeof batch.$inferSelect;

/** The organisation's batch or 404 (another organisation's batch is "not found", never "forbidden"). */
export async function loadBatch(db: Db, organizationId: string, id: string): Promise<BatchRow> {
  const [b] = await db.select().from(batch).where(and(eq(batch.id, id), eq(batch.organizationId, organizationId)));
  if (!b) throw notFound('That batch');
  return b;
}

/** 409 unless the batch may still change. */
export function assertWritable(b: BatchRow): void {
  if (b.state === 'released') throw new HttpError(409, 'batch_released', 'This batch is released and read-only.');
  if (b.archived) throw new HttpError(409, 'batch_archived', 'This batch is archived; restore it before changing it.');
}

/** The caller's batch, 409 unless it may still change. */
export async function loadWritableBatch(db: Db, organizationId: string, id: string): Promise<BatchRow> {
  const b = await loadBatch(db, organizationId, id);
  assertWritable(b);
  return b;
}

/** The API shape of a batch, with extra fields (counts, summary) after its own. */
export function batchJson(b: BatchRow, extra: Partial<Pick<BatchOut, 'curve_count' | 'mean_pmp_w' | 'summary' | 'flag_counts'>> = {}): BatchOut {
  return {
    id: b.id,
    name: b.name,
    product_type: b.product_type,
    supplier: b.supplier,
    line: b.line,
    lot: b.lot,
    batch_date: b.batch_date,
    cells: b.cells,
    area_cm2: b.area_cm2,
    nameplate_w: b.nameplate_w,
    irradiance_w_m2: b.irradiance_w_m2,
    alpha_pct_per_k: b.alpha_pct_per_k,
    beta_pct_per_k: b.beta_pct_per_k,
    gamma_pct_per_k: b.gamma_pct_per_k,
    rs_ohm: b.rs_ohm,
    kappa_ohm_per_k: b.kappa_ohm_per_k,
    setup_id: b.setup_id,
    description: b.description,
    archived: b.archived,
    state: b.state as BatchOut['state'],
    created_at: b.createdAt,
    updated_at: b.updatedAt,
    ...extra,
  };
}

/** What a batch says for files that do not (cells, area, irradiance) and the coefficients for their STC figures. */
export function batchDefaults(b: BatchRow): FileDefaults {
  return { cells: b.cells, area_cm2: b.area_cm2, irradiance_w_m2: b.irradiance_w_m2, coefficients: batchCoefficients(b) };
}

/** The module type's coefficients the batch holds (lib/analysis/stc.ts). */
export function batchCoefficients(b: BatchRow): StcCoefficients {
  return { alpha_pct_per_k: b.alpha_pct_per_k, beta_pct_per_k: b.beta_pct_per_k, gamma_pct_per_k: b.gamma_pct_per_k, rs_ohm: b.rs_ohm, kappa_ohm_per_k: b.kappa_ohm_per_k };
}

/** Creates a batch in the caller's organisation. */
export async function createBatch(db: Db, who: { organizationId: string; userId: string }, input: ReturnType<typeof batchCreateSchema.parse>) {
  await assertSetupOf(db, who.organizationId, input.setup_id);
  const [b] = await db.insert(batch).values({ id: crypto.randomUUID(), organizationId: who.organizationId, createdBy: who.userId, ...input }).returning();
  return batchJson(b);
}

/** Renames, describes, archives or restores a batch; 409 once it is released. */
export async function updateBatch(db: Db, organizationId: string, id: string, input: ReturnType<typeof batchUpdateSchema.parse>) {
  const b = await loadBatch(db, organizationId, id);
  if (b.state === 'released') throw new HttpError(409, 'batch_released', 'This batch is released and read-only.');
  await assertSetupOf(db, organizationId, input.setup_id);
  const changes = Object.fromEntries(Object.entries(input).filter(([, v]) => v !== undefined));
  const [u] = await touchBatch(db, b.id, changes);
  return batchJson(u);
}
