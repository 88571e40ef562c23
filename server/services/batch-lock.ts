/**
 * The batch row locked for the rest of a transaction (`select … for update`), so a write that
 * checks the batch's state cannot interleave with a release, a hold or a reopening of it: the
 * check and the write see the same state, or the other transaction waits.
 */
import { eq } from 'drizzle-orm';
import type { Db } from '@/db/client';
import { batch } from '@/db/schema';
import { notFound } from '@/server/errors';
import { assertWritable } from '@/server/services/batches';
import type { BatchRow } from '@/server/services/batches';

export type Tx = Parameters<Parameters<Db['transaction']>[0]>[0];

/** The batch, locked until the transaction ends; 404 when it is gone. */
export async function lockBatch(tx: Tx, batchId: string): Promise<BatchRow> {
  const [b] = await tx.select().from(batch).where(eq(batch.id, batchId)).for('update');
  if (!b) throw notFound('That batch');
  return b;
}

/** The batch locked, 409 unless its curves may still change (released: `batch_released`; archived). */
export async function lockWritableBatch(tx: Tx, batchId: string): Promise<BatchRow> {
  const b = await lockBatch(tx, batchId);
  assertWritable(b);
  return b;
}
