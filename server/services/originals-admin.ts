/**
 * Keeping the archive honest: an administrator re-hashes a batch's originals (mismatches and
 * missing objects reported), deletes them after the retention period (refused for a released
 * batch inside it; one audit entry), and the start-up cleanup removes objects no row points to.
 */
import { createHash } from 'node:crypto';
import { and, desc, eq, isNull } from 'drizzle-orm';
import type { Db } from '@/db/client';
import { batchRelease, curve, organizationSetting, originalFile } from '@/db/schema';
import { isoUtc } from '@/lib/quality/csv';
import { HttpError } from '@/server/errors';
import { recordAudit } from '@/server/services/audit';
import type { Actor } from '@/server/services/audit';
import { loadBatch } from '@/server/services/batches';
import { keptOriginals, storeOrUnavailable } from '@/server/services/originals';
import { ObjectMissingError, originalKey, parseOriginalKey } from '@/server/storage';
import type { ObjectStore } from '@/server/storage';

/** Years originals are kept when the organisation has not said (its `organization_setting` row's default). */
export const DEFAULT_RETENTION_YEARS = 10;

export async function retentionYears(db: Db, organizationId: string): Promise<number> {
  const [s] = await db.select({ y: organizationSetting.retentionYears }).from(organizationSetting).where(eq(organizationSetting.organizationId, organizationId));
  return s?.y ?? DEFAULT_RETENTION_YEARS;
}

/** `at` plus whole years (calendar years, UTC). */
export function addYears(at: Date, years: number): Date {
  const d = new Date(at);
  d.setUTCFullYear(d.getUTCFullYear() + years);
  return d;
}

/**
 * POST /api/batches/:id/originals/verify — reads every kept original back, hashes it and
 * compares with the SHA-256 recorded at upload (and on the curve made from it).
 */
export async function verifyBatchOriginals(db: Db, store: ObjectStore | null, organizationId: string, batchId: string) {
  const b = await loadBatch(db, organizationId, batchId);
  const s = storeOrUnavailable(store);
  await s.ping();
  const rows = await keptOriginals(db, b.id);
  const curves = new Map((await db.select({ id: curve.id, sha: curve.file_sha256 }).from(curve).where(eq(curve.batchId, b.id))).map((c) => [c.id, c.sha]));
  const problems: { file_name: string; device_id: string | null; problem: 'mismatch' | 'missing' | 'curve_mismatch'; expected_sha256: string; found_sha256: string | null }[] = [];
  for (const r of rows) {
    let found: string | null = null;
    try {
      found = createHash('sha256').update(await s.get(originalKey(r.organizationId, r.batchId, r.sha256))).digest('hex');
    } catch (err) {
      if (!(err instanceof ObjectMissingError)) throw err;
    }
    const onCurve = r.curveId ? curves.get(r.curveId) : undefined;
    if (found === null) problems.push({ file_name: r.fileName, device_id: r.deviceId, problem: 'missing', expected_sha256: r.sha256, found_sha256: null });
    else if (found !== r.sha256) problems.push({ file_name: r.fileName, device_id: r.deviceId, problem: 'mismatch', expected_sha256: r.sha256, found_sha256: found });
    else if (onCurve && onCurve !== r.sha256) problems.push({ file_name: r.fileName, device_id: r.deviceId, problem: 'curve_mismatch', expected_sha256: onCurve, found_sha256: found });
  }
  return { batch_id: b.id, checked: rows.length, ok: problems.length === 0, problems, checked_at: new Date().toISOString() };
}

/**
 * DELETE /api/batches/:id/originals — an administrator deletes the batch's kept originals: the
 * rows are marked deleted with one audit entry, then the objects go (objects left behind by a
 * storage failure are orphans, removed at the next start). A released batch (any release) keeps
 * them until its newest release is older than the organisation's retention years: 409 until then.
 */
export async function deleteBatchOriginals(db: Db, store: ObjectStore | null, by: NonNullable<Actor> & { organizationId: string }, batchId: string, now = new Date()) {
  const b = await loadBatch(db, by.organizationId, batchId);
  const s = storeOrUnavailable(store);
  const [release] = await db.select({ at: batchRelease.createdAt }).from(batchRelease).where(eq(batchRelease.batchId, b.id)).orderBy(desc(batchRelease.createdAt)).limit(1);
  const years = await retentionYears(db, by.organizationId);
  if (release) {
    const until = addYears(release.at, years);
    if (until > now) {
      throw new HttpError(409, 'retention_period', `Batch ${b.name} was released on ${isoUtc(release.at).slice(0, 10)}; its original files are kept for ${years} years, until ${isoUtc(until).slice(0, 10)}.`, undefined, { kept_until: until.toISOString() });
    }
  }
  await s.ping();
  const rows = await keptOriginals(db, b.id);
  await db.transaction(async (tx) => {
    await tx.update(originalFile).set({ deletedAt: now, deletedBy: by.userId }).where(and(eq(originalFile.batchId, b.id), isNull(originalFile.deletedAt)));
    await recordAudit(tx, { organizationId: by.organizationId, actor: by, action: 'originals_deleted', details: { batch_id: b.id, batch_name: b.name, files: String(rows.length) } });
  });
  const keys = [...new Set(rows.map((r) => originalKey(r.organizationId, r.batchId, r.sha256)))];
  await s.remove(keys);
  return { batch_id: b.id, deleted: rows.length, deleted_at: now.toISOString() };
}

/**
 * Objects no kept row points to — a crash between the object and its row, a deletion whose
 * objects storage did not remove — are removed. `minAgeMs` spares objects younger than that
 * (uploads of another server sharing the bucket); at the embedded server's start none are running.
 */
export async function cleanOrphans(db: Db, store: ObjectStore, opts: { minAgeMs?: number; now?: Date } = {}): Promise<{ objects: number; removed: number }> {
  const rows = await db.select({ org: originalFile.organizationId, batch: originalFile.batchId, sha: originalFile.sha256 }).from(originalFile).where(isNull(originalFile.deletedAt));
  const live = new Set(rows.map((r) => originalKey(r.org, r.batch, r.sha)));
  const before = (opts.now ?? new Date()).getTime() - (opts.minAgeMs ?? 0);
  const objects = await store.list('org/');
  const orphans = objects.filter((o) => parseOriginalKey(o.key) && !live.has(o.key) && o.modified.getTime() <= before).map((o) => o.key);
  await store.remove(orphans);
  return { objects: objects.length, removed: orphans.length };
}
