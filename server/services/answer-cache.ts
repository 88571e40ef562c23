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

/**
 * Serialized JSON answers (UTF-8 bytes, ready to send), least recently used dropped first once
 * `maxBytes` is exceeded. Keys carry the revision they were computed from, so a stale entry is
 * never hit, only aged out.
 */
export class AnswerCache {
  private readonly entries = new Map<string, Buffer>();
  private bytes = 0;

  constructor(private readonly maxBytes = 64 * 1024 * 1024) {}

  /** The answer under `key`, computing and keeping it when missing (`compute` may serialize it itself). */
  async get(key: string, compute: () => Promise<unknown>): Promise<Buffer> {
    const hit = this.entries.get(key);
    if (hit !== undefined) {
      this.entries.delete(key);
      this.entries.set(key, hit);
      return hit;
    }
    const answer = await compute();
    const body = Buffer.isBuffer(answer) ? answer : Buffer.from(JSON.stringify(answer));
    if (body.length <= this.maxBytes) {
      this.entries.set(key, body);
      this.bytes += body.length;
      for (const [k, v] of this.entries) {
        if (this.bytes <= this.maxBytes) break;
        this.entries.delete(k);
        this.bytes -= v.length;
      }
    }
    return body;
  }

  get size(): number {
    return this.entries.size;
  }
}

/** The cache key of an answer about one batch state. */
/** Sends a cached answer as JSON. */
export function sendAnswer(res: Response, body: Buffer): void {
  res.type('application/json').send(body);
}

export function batchKey(b: { id: string; updatedAt: Date }, what: string): string {
  return `${b.id}@${b.updatedAt.getTime()}:${what}`;
}
