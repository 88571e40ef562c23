/**
 * Re-analysing a curve from its original file: the bytes kept in object storage are read again
 * by the current reader and fits (a newer parser or fit version), the new fits become current and
 * the earlier ones stay in the fit history; never for a released batch (409 batch_released).
 */
import { createHash } from 'node:crypto';
import { and, eq } from 'drizzle-orm';
import type { Db } from '@/db/client';
import { batch, curve, fit } from '@/db/schema';
import { ANALYSIS_VERSION } from '@/lib/analysis/version';
import type { FileOverrides } from '@/lib/analysis/analyse-file';
import { formatValue } from '@/lib/vocabulary';
import { HttpError } from '@/server/errors';
import type { Analyser } from '@/server/services/analysis-pool';
import { touchBatch } from '@/server/services/answer-cache';
import { lockWritableBatch } from '@/server/services/batch-lock';
import { assertWritable, batchDefaults } from '@/server/services/batches';
import { comparisonRecord, curveDetail, derivedColumns, insertFits, loadCurve } from '@/server/services/curves';
import { curveOriginal } from '@/server/services/originals';
import type { ObjectStore } from '@/server/storage';

/**
 * POST /api/curves/:id/reanalyse { use_file_conditions? } — reads the original again. The curve's
 * present temperature, irradiance, cells and area (upload overrides and refit corrections) are
 * kept unless `use_file_conditions` asks for what the file and the batch say. The device id stays.
 */
export async function reanalyseCurve(db: Db, store: ObjectStore | null, analyser: Analyser, who: { organizationId: string; userId: string }, id: string, body: { use_file_conditions?: boolean }) {
  const row = await loadCurve(db, who.organizationId, id);
  const [b] = await db.select().from(batch).where(eq(batch.id, row.batchId));
  // An early answer; the check that counts is under the lock below.
  assertWritable(b);
  const original = await curveOriginal(db, store, who.organizationId, row.id);
  const found = createHash('sha256').update(original.bytes).digest('hex');
  if (found !== row.file_sha256) throw new HttpError(409, 'original_changed', `The original file of device ${row.deviceId} no longer has the SHA-256 recorded at upload; an administrator can check the batch's archive. Nothing was changed.`);
  const m = row.meta;
  const overrides: FileOverrides = body.use_file_conditions ? {} : { temp_c: m.temp_c, irradiance_w_m2: m.irradiance_w_m2, cells: m.cells, area_cm2: m.area_cm2 };
  const outcome = await analyser.analyse({ bytes: new Uint8Array(original.bytes), fileName: original.fileName, overrides, defaults: batchDefaults(b) });
  if (!outcome.ok) {
    if (outcome.kind === 'input') throw new HttpError(422, outcome.code, `The original file of device ${row.deviceId} cannot be read by the current reader: ${outcome.message}`);
    throw new Error(`re-analysis failed: ${outcome.message}`);
  }
  const a = outcome.analysis;
  const before = `before: Isc ${formatValue('isc_a', row.isc_a)} A, Voc ${formatValue('voc_v', row.voc_v)} V, Pmax ${formatValue('pmp_w', row.pmp_w)} W, ${row.voltage_v.length} points`;
  const reason = `reanalysed from the original file (analysis version ${ANALYSIS_VERSION}${body.use_file_conditions ? ', conditions from the file' : ''}; ${before})`;
  await db.transaction(async (tx) => {
    await lockWritableBatch(tx, row.batchId);
    await tx.update(fit).set({ current: false }).where(and(eq(fit.curveId, row.id), eq(fit.current, true)));
    await insertFits(tx, row.id, a.fits, { ...a.conditions, analysis_version: ANALYSIS_VERSION }, reason, who.userId);
    const cols = derivedColumns(a);
    const record = comparisonRecord({ id: row.id, batch_id: row.batchId, device_id: row.deviceId }, a, cols);
    await tx
      .update(curve)
      .set({ meta: { ...a.curve.meta, device_id: row.meta.device_id }, voltage_v: a.curve.voltage_v, current_a: a.curve.current_a, notes: a.curve.notes, metrics: a.metrics, flags: a.flags, stc: a.stc, ...cols, record })
      .where(eq(curve.id, row.id));
    await touchBatch(tx, row.batchId);
  });
  return curveDetail(db, who.organizationId, row.id);
}
