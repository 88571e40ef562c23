/**
 * Release records: what a release froze (spec version, counts, each device's figures, result and
 * the SHA-256 of its data, the pass/fail CSV as served), separation of duties, and reopening a
 * released batch with a written reason. The decision itself is `decideBatch` in reviews.ts.
 */
import { uncertaintyByKey } from '@/lib/quality/uncertainty';
import { createHash } from 'node:crypto';
import { and, asc, count, desc, eq, inArray } from 'drizzle-orm';
import type { Db } from '@/db/client';
import { batch, batchRelease, batchReview, curve, organizationSetting, user } from '@/db/schema';
import type { BatchEvaluation } from '@/lib/quality';
import { HV_CAUTION } from '@/lib/strings/cautions';
import { HttpError, notFound } from '@/server/errors';
import type { Caller } from '@/server/permissions';
import { touchBatch } from '@/server/services/answer-cache';
import { lockBatch } from '@/server/services/batch-lock';
import type { Tx } from '@/server/services/batch-lock';
import { batchJson, loadBatch } from '@/server/services/batches';

export type ReleaseRow = typeof batchRelease.$inferSelect;

/** SHA-256 (hex) of text or bytes. */
export const sha256 = (data: string | Uint8Array) => createHash('sha256').update(data).digest('hex');

/**
 * SHA-256 of a curve's measured points as stored: the UTF-8 JSON of `[voltage_v, current_a]`
 * (JavaScript's shortest round-trip numbers), so the same points always give the same hash.
 */
export const pointsSha256 = (voltage_v: number[], current_a: number[]) => sha256(JSON.stringify([voltage_v, current_a]));

/** Whether the organisation keeps release apart from submission and upload (on unless switched off). */
export async function separatesRelease(db: Db | Tx, organizationId: string): Promise<boolean> {
  const [s] = await db.select({ on: organizationSetting.separateRelease }).from(organizationSetting).where(eq(organizationSetting.organizationId, organizationId));
  return s?.on ?? true;
}

export type ReleaseCheck = { allowed: true } | { allowed: false; code: 'same_person'; message: string };

/**
 * Separation of duties: whoever submitted the batch (at any time) or uploaded any of its curves
 * may not release it, while the organisation's setting is on (the default).
 */
export async function releaseCheck(db: Db | Tx, organizationId: string, batchId: string, userId: string): Promise<ReleaseCheck> {
  if (!(await separatesRelease(db, organizationId))) return { allowed: true };
  const [submitted] = await db.select({ n: count() }).from(batchReview).where(and(eq(batchReview.batchId, batchId), eq(batchReview.action, 'submitted'), eq(batchReview.actorId, userId)));
  const [uploaded] = await db.select({ n: count() }).from(curve).where(and(eq(curve.batchId, batchId), eq(curve.createdBy, userId)));
  if (!submitted.n && !uploaded.n) return { allowed: true };
  const what = submitted.n && uploaded.n ? 'submitted this batch and uploaded some of its curves' : submitted.n ? 'submitted this batch' : 'uploaded some of its curves';
  return { allowed: false, code: 'same_person', message: `You ${what}, so another QA lead must release it (separation of duties).` };
}

/** The figures a release keeps of each device, by key. */
const DEVICE_FIGURES = ['isc_a', 'voc_v', 'pmp_w', 'imp_a', 'vmp_v', 'ff', 'efficiency', 'stc_pmp_w', 'n', 'rs_ohm', 'rsh_ohm', 'j0_a_cm2'] as const;

/**
 * Each judged device as the release keeps it: figures, result, reasons, power class, and the
 * SHA-256 of its points (and of its uploaded file when the upload was hashed).
 */
export async function frozenDevices(db: Db, batchId: string, evaluation: BatchEvaluation, curveIds: string[]) {
  const rows = await db.select({ id: curve.id, v: curve.voltage_v, i: curve.current_a, file: curve.file_sha256 }).from(curve).where(eq(curve.batchId, batchId));
  const byId = new Map(rows.map((r) => [r.id, r]));
  return evaluation.devices.map((d, k) => {
    const c = byId.get(curveIds[k]);
    return {
      device_id: d.device_id,
      curve_id: curveIds[k],
      result: d.result,
      reasons: d.reasons.map((r) => r.message),
      power_class: d.power_class,
      outlier: d.outlier,
      figures: Object.fromEntries(DEVICE_FIGURES.map((key) => [key, d.values[key] ?? null])),
      // The expanded uncertainties (k = 2) the figures carried when judged, and whether a value lay within one of a limit.
      uncertainty: uncertaintyByKey(d.uncertainty),
      in_guard_band: d.in_guard_band,
      points_sha256: c ? pointsSha256(c.v, c.i) : null,
      file_sha256: c?.file ?? null,
    };
  });
}

/** The revision a release of the batch now would be: one more than the reopenings so far. */
export async function currentRevision(tx: Db | Tx, batchId: string): Promise<number> {
  const [r] = await tx.select({ n: count() }).from(batchReview).where(and(eq(batchReview.batchId, batchId), eq(batchReview.action, 'reopened')));
  return r.n + 1;
}

/** A release without its devices and CSV text, for lists. */
export function releaseSummary(r: ReleaseRow, releasedBy: string | null) {
  return {
    id: r.id,
    revision: r.revision,
    review_id: r.reviewId,
    spec_id: r.specId,
    spec_name: r.specName,
    spec_version: r.specVersion,
    counts: r.counts,
    comment: r.comment,
    released_by: releasedBy,
    created_at: r.createdAt,
    csv_file_name: r.csvFileName,
    csv_sha256: r.csvSha256,
    csv_url: `/api/batches/${r.batchId}/releases/${r.id}/pass-fail.csv`,
  };
}

/** Every release of a batch, newest first. */
export async function releasesOf(db: Db, batchId: string) {
  const rows = await db.select({ r: batchRelease, by: user.name }).from(batchRelease).leftJoin(user, eq(user.id, batchRelease.releasedBy)).where(eq(batchRelease.batchId, batchId)).orderBy(desc(batchRelease.revision));
  return rows.map(({ r, by }) => releaseSummary(r, by));
}

/** The newest release of a batch, or null. */
export async function latestRelease(db: Db, batchId: string): Promise<ReleaseRow | null> {
  const [r] = await db.select().from(batchRelease).where(eq(batchRelease.batchId, batchId)).orderBy(desc(batchRelease.revision)).limit(1);
  return r ?? null;
}

/** One release of the organisation's batch, or 404. */
async function loadRelease(db: Db, organizationId: string, batchId: string, releaseId: string): Promise<ReleaseRow> {
  const b = await loadBatch(db, organizationId, batchId);
  const [r] = await db.select().from(batchRelease).where(and(eq(batchRelease.id, releaseId), eq(batchRelease.batchId, b.id)));
  if (!r) throw notFound('That release');
  return r;
}

/**
 * One release with every device as frozen, and the high-voltage caution that goes with its
 * figures (the pass/fail CSV itself holds data rows only).
 */
export async function releaseDetail(db: Db, organizationId: string, batchId: string, releaseId: string) {
  const r = await loadRelease(db, organizationId, batchId, releaseId);
  const [by] = r.releasedBy ? await db.select({ name: user.name }).from(user).where(eq(user.id, r.releasedBy)) : [];
  return { ...releaseSummary(r, by?.name ?? null), devices: r.devices, caution: HV_CAUTION.short };
}

/** The pass/fail CSV a release shipped, byte for byte. */
export async function releaseCsv(db: Db, organizationId: string, batchId: string, releaseId: string): Promise<{ fileName: string; text: string }> {
  const r = await loadRelease(db, organizationId, batchId, releaseId);
  return { fileName: r.csvFileName, text: r.csv };
}

/**
 * A QA lead reopens a released batch with a written reason: it goes on hold (a test engineer
 * changes and submits it again, and a QA lead decides anew), as the next revision; every
 * earlier release stays readable and downloadable.
 */
export async function reopenBatch(db: Db, by: Caller, batchId: string, reason: string) {
  const b = await loadBatch(db, by.organization.id, batchId);
  await db.transaction(async (tx) => {
    const locked = await lockBatch(tx, b.id);
    if (locked.state !== 'released') throw new HttpError(409, 'not_released', 'Only a released batch can be reopened.');
    await touchBatch(tx, b.id, { state: 'on_hold' });
    await tx.insert(batchReview).values({ id: crypto.randomUUID(), batchId: b.id, action: 'reopened', comment: reason, actorId: by.user.id });
  });
  const [after] = await db.select().from(batch).where(eq(batch.id, b.id));
  return { batch: batchJson(after), revision: await currentRevision(db, b.id) };
}

/** Releases keyed by their review row, for the review list. */
export async function releaseIdsByReview(db: Db, reviewIds: string[]): Promise<Map<string, string>> {
  if (!reviewIds.length) return new Map();
  const rows = await db.select({ id: batchRelease.id, reviewId: batchRelease.reviewId }).from(batchRelease).where(inArray(batchRelease.reviewId, reviewIds)).orderBy(asc(batchRelease.revision));
  return new Map(rows.map((r) => [r.reviewId, r.id]));
}
