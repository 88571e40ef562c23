/**
 * What a change on the server makes stale in the client's cache, named once for every mutation in
 * lib/api. Invalidation marks queries stale; only those on screen fetch again at once.
 */
import type { Query, QueryClient } from '@tanstack/react-query';
import { batchKeys, comparedBatches, curveKeys, outboxKeys, qualityKeys, sessionKeys, userKeys } from '@/lib/api/keys';

/**
 * A batch's figures changed (curves added or refitted): the batch list (counts, mean Pmax), all
 * that is cached about the batch (summary, curve pages, overlay, evaluations, reviews) and every
 * comparison that includes it.
 */
export async function invalidateBatchFigures(qc: QueryClient, batchId: string): Promise<void> {
  await Promise.all([
    qc.invalidateQueries({ queryKey: batchKeys.list() }),
    qc.invalidateQueries({ queryKey: batchKeys.one(batchId) }),
    qc.invalidateQueries({ queryKey: qualityKeys.comparisons(), predicate: (q) => comparedBatches(q.queryKey).includes(batchId) }),
  ]);
}

/**
 * Whose batch a cached curve answer belongs to, read from the answer itself because curve keys
 * hold only the curve's id; undefined when nothing usable is cached.
 */
function batchOfCurveAnswer(q: Query): string | undefined {
  const d = q.state.data as { batch?: { id?: string } | null; curve?: { batch?: { id?: string } | null } } | undefined;
  return d?.batch?.id ?? d?.curve?.batch?.id ?? undefined;
}

/**
 * A batch changed as a whole (upload, new name, state): its figures as above, and the cached curves
 * of that batch, whose pages show the batch's name and state (refit closes once it is released)
 * and which a replacing upload may have removed. A curve answer of unknown batch is marked too.
 */
export async function invalidateBatchData(qc: QueryClient, batchId: string): Promise<void> {
  await Promise.all([
    invalidateBatchFigures(qc, batchId),
    qc.invalidateQueries({
      queryKey: curveKeys.all,
      predicate: (q) => {
        const owner = batchOfCurveAnswer(q);
        return owner === undefined || owner === batchId;
      },
    }),
  ]);
}

/** A review request or decision was recorded and mailed: the batch as a whole and the outbox. */
export async function invalidateBatchReview(qc: QueryClient, batchId: string): Promise<void> {
  await Promise.all([invalidateBatchData(qc, batchId), qc.invalidateQueries({ queryKey: outboxKeys.all })]);
}

/**
 * A membership change (role, invitation, request answered, deactivation, removal, the joining
 * setting): everything under the users root (members, invitations, requests, the record), the
 * session (an admin may have changed their own role) and the outbox (most of them mail someone).
 */
export async function invalidateMembership(qc: QueryClient): Promise<void> {
  await Promise.all([
    qc.invalidateQueries({ queryKey: userKeys.all }),
    qc.invalidateQueries({ queryKey: sessionKeys.me() }),
    qc.invalidateQueries({ queryKey: outboxKeys.all }),
  ]);
}
