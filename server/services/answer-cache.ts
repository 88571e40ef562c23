/**
 * Batch revisions and a cache of serialized answers keyed by them.
 *
 * Every write that changes a batch or its curves or fits calls `touchBatch` in its transaction,
 * which moves `batch.updated_at` strictly forward in whole milliseconds; so (batch id,
 * updatedAt) names one state of a batch's data, and an answer computed from that state can be
 * served again while the stamp is unchanged. The server is the database's only user (PGlite is
 * embedded), so nothing changes a batch without passing here.
 */
import { eq, sql } from 'drizzle-orm';
import type { Response } from 'express';
import { LRUCache } from 'lru-cache';
import type { Db } from '@/db/client';
import { batch } from '@/db/schema';

type Tx = Parameters<Parameters<Db['transaction']>[0]>[0];

/** Marks a batch changed: updated_at = the later of now and the previous stamp + 1 ms. */
export async function touchBatch(tx: Tx | Db, batchId: string, changes: Partial<typeof batch.$inferInsert> = {}) {
  return tx
    .update(batch)
    .set({ ...changes, updatedAt: sql`greatest(date_trunc('milliseconds', now()), ${batch.updatedAt} + interval '1 millisecond')` })
    .where(eq(batch.id, batchId))
    .returning();
}

/** Computes an answer: a value to serialize as JSON, or the bytes already serialized. */
export type ComputeAnswer = () => Promise<unknown>;

/**
 * Serialized JSON answers (UTF-8 bytes, ready to send), least recently used dropped first once
 * their bytes pass `maxBytes` (an answer larger than that is sent but not kept). Keys carry the
 * revision they were computed from, so a stale entry is never hit, only aged out. Requests that
 * miss one key at the same time share one computation (lru-cache's fetch); a computation that
 * fails is not kept, and each of those requests gets its error.
 */
export class AnswerCache {
  private readonly cache: LRUCache<string, Buffer, ComputeAnswer>;

  constructor(maxBytes = 64 * 1024 * 1024) {
    this.cache = new LRUCache<string, Buffer, ComputeAnswer>({
      maxSize: maxBytes,
      sizeCalculation: (body) => Math.max(1, body.length),
      fetchMethod: async (_key, _stale, { context: compute }) => {
        const answer = await compute();
        return Buffer.isBuffer(answer) ? answer : Buffer.from(JSON.stringify(answer));
      },
    });
  }

  /** The answer under `key`, computing and keeping it when missing (`compute` may serialize it itself). */
  async get(key: string, compute: ComputeAnswer): Promise<Buffer> {
    const body = await this.cache.fetch(key, { context: compute });
    // fetch gives undefined only when the computation gives nothing, which ours never does.
    if (!body) throw new Error(`the answer ${key} could not be computed`);
    return body;
  }

  /** Answers kept. */
  get size(): number {
    return this.cache.size;
  }

  /** Bytes kept. */
  get bytes(): number {
    return this.cache.calculatedSize;
  }
}

/** Sends a cached answer as JSON. */
export function sendAnswer(res: Response, body: Buffer): void {
  res.type('application/json').send(body);
}

/** The cache key of an answer about one batch state. */
export function batchKey(b: { id: string; updatedAt: Date }, what: string): string {
  return `${b.id}@${b.updatedAt.getTime()}:${what}`;
}
