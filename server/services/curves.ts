/**
 * Storing, reading and refitting curves. Every curve is written with its fits in one
 * transaction, so a reader (or a restart after a crash) sees either the whole curve or nothing of it.
 */
import { deviceUncertainty, uncertaintyByKey } from '@/lib/quality/uncertainty';
import { batchSetupRef } from '@/server/services/setups';
import { and, eq, getTableColumns, inArray, sql } from 'drizzle-orm';
import type { Db } from '@/db/client';
import { batch, curve, fit } from '@/db/schema';
import type { FileAnalysis } from '@/lib/analysis/analyse-file';
import { isSingleDiodeFit } from '@/lib/iv';
import type { CurveMeta, FitResult, FitSummary } from '@/lib/iv';
import { encodeComparisonRecord } from '@/lib/quality/comparison-record';
import { stcAbsentReason, stcFiguresOf } from '@/lib/schemas/curves';
import type { refitSchema } from '@/lib/schemas/curves';
import { formatValue, labelOf } from '@/lib/vocabulary';
import { HttpError, notFound } from '@/server/errors';
import type { Analyser } from '@/server/services/analysis-pool';
import { touchBatch } from '@/server/services/answer-cache';
import { lockWritableBatch } from '@/server/services/batch-lock';
import { assertWritable, batchCoefficients } from '@/server/services/batches';
import { originalInfo } from '@/server/services/original-info';

type Tx = Parameters<Parameters<Db['transaction']>[0]>[0];
type CurveRow = typeof curve.$inferSelect;
type FitRow = typeof fit.$inferSelect;

/** Which curve a comparison record is of. */
export type CurveKey = { id: string; batch_id: string; device_id: string };

/**
 * A curve's comparison record as stored in `curve.record` (the fields and their order:
 * lib/quality/comparison-record.ts; single-diode figures only when fitted). deviceRecords in
 * server/services/quality.ts reads 10,000 of these as one text instead of 150,000 fields.
 */
export function comparisonRecord(key: CurveKey, a: Pick<FileAnalysis, 'curve' | 'metrics' | 'stc'>, d: ReturnType<typeof derivedColumns>): string {
  const meta = a.curve.meta;
  return encodeComparisonRecord({
    curve_id: key.id,
    batch_id: key.batch_id,
    device_id: key.device_id,
    metrics: a.metrics,
    cells: meta.cells ?? null,
    area_cm2: meta.area_cm2 ?? null,
    flagCodes: d.flagCodes,
    stc_pmp_w: d.stc_pmp_w,
    stc_absent_reason: stcFiguresOf(a.stc) ? null : stcAbsentReason(a.stc),
    fitted: d.fitted,
    iph_a: d.iph_a,
    i0_a: d.i0_a,
    n: d.n,
    rs_ohm: d.rs_ohm,
    rsh_ohm: d.rsh_ohm,
    rmse_a: d.rmse_a,
  });
}

/** The sortable/filterable columns derived from an analysis. */
export function derivedColumns(a: FileAnalysis) {
  const single = a.fits.filter(isSingleDiodeFit).find((f) => f.converged);
  return {
    isc_a: a.metrics.isc_a,
    voc_v: a.metrics.voc_v,
    pmp_w: a.metrics.pmp_w,
    ff: a.metrics.ff,
    efficiency: a.metrics.efficiency,
    n: single?.n ?? null,
    rs_ohm: single?.rs_ohm ?? null,
    rsh_ohm: single?.rsh_ohm ?? null,
    stc_pmp_w: stcFiguresOf(a.stc)?.pmp_w ?? null,
    iph_a: single?.iph_a ?? null,
    i0_a: single?.i0_a ?? null,
    rmse_a: single?.rmse_a ?? null,
    fitted: !!single,
    flagCodes: a.flags.map((f) => f.code).join(' '),
  };
}

let lastStamp = 0;
/** A creation time a millisecond after the previous one at least, so curves stored in one group keep their upload order. */
function nextStamp(): Date {
  lastStamp = Math.max(Date.now(), lastStamp + 1);
  return new Date(lastStamp);
}

/** One analysed curve to store; `id` is chosen by the caller so it can answer before the write; `fileSha256` of the uploaded bytes when known. */
export type CurveToStore = { id: string; fileName: string; analysis: FileAnalysis; replaceIds?: string[]; fileSha256?: string; fileSize?: number; status?: 'queued' | 'done' };

/**
 * Inserts analysed curves and their fits in one transaction (a multi-row insert: about three
 * times cheaper a curve than one transaction each), deleting the curves they replace and marking
 * the batch changed. A reader, or a restart after a crash, sees all of the group or none of it.
 */
export async function storeCurves(
  db: Db,
  target: { organizationId: string; batchId: string; userId: string | null },
  items: CurveToStore[],
  /** More writes of the same transaction, before the curves (an upload's rows of kept originals). */
  before?: (tx: Tx) => Promise<void>,
): Promise<void> {
  if (!items.length) return;
  const replaced = [...new Set(items.flatMap((x) => x.replaceIds ?? []))];
  await db.transaction(async (tx) => {
    await lockWritableBatch(tx, target.batchId);
    await before?.(tx);
    if (replaced.length) await tx.delete(curve).where(and(inArray(curve.id, replaced), eq(curve.batchId, target.batchId)));
    await tx.insert(curve).values(
      items.map(({ id, fileName, analysis: a, fileSha256, fileSize, status }) => {
        const deviceId = a.curve.meta.device_id ?? fileName;
        const derived = derivedColumns(a);
        return {
          id,
          organizationId: target.organizationId,
          batchId: target.batchId,
          deviceId,
          fileName,
          meta: a.curve.meta,
          voltage_v: a.curve.voltage_v,
          current_a: a.curve.current_a,
          notes: a.curve.notes,
          metrics: a.metrics,
          flags: a.flags,
          stc: a.stc,
          createdBy: target.userId,
          createdAt: nextStamp(),
          file_sha256: fileSha256 ?? null,
          file_size: fileSize ?? null,
          status: status ?? 'done',
          ...derived,
          record: comparisonRecord({ id, batch_id: target.batchId, device_id: deviceId }, a, derived),
        };
      }),
    );
    const fits = items.flatMap(({ id, analysis: a }) =>
      a.fits.map((f) => ({ id: crypto.randomUUID(), curveId: id, model: f.model, current: true, result: storedFit(f), conditions: a.conditions, reason: 'upload', createdBy: target.userId })),
    );
    if (fits.length) await tx.insert(fit).values(fits);
    // Cached answers about the batch (comparison, summary, pages) key on its revision.
    await touchBatch(tx, target.batchId);
  });
}

/** Inserts one analysed curve and its fits; replaces `replaceIds` in the same transaction. */
export async function storeCurve(
  db: Db,
  input: { organizationId: string; batchId: string; fileName: string; analysis: FileAnalysis; userId: string | null; replaceIds?: string[] },
): Promise<string> {
  const id = crypto.randomUUID();
  await storeCurves(db, { organizationId: input.organizationId, batchId: input.batchId, userId: input.userId }, [{ id, fileName: input.fileName, analysis: input.analysis, replaceIds: input.replaceIds }]);
  return id;
}

export async function insertFits(tx: Tx | Db, curveId: string, fits: FitResult[], conditions: Record<string, unknown>, reason: string, userId: string | null) {
  if (!fits.length) return;
  await tx.insert(fit).values(
    fits.map((f) => ({ id: crypto.randomUUID(), curveId, model: f.model, current: true, result: storedFit(f), conditions, reason, createdBy: userId })),
  );
}

/** Significant digits a stored residual keeps. */
export const RESIDUAL_DIGITS = 4;

/**
 * A fit as stored: its residuals to RESIDUAL_DIGITS significant digits. They are drawn (the curve
 * page's residual chart) and summed (lib/analysis/compare-fits.ts), where the fifth digit changes
 * nothing; a residual kept in full is ~20 characters against ~9, half of a curve's stored bytes,
 * and parsing those digits was most of the database's work in storing an upload.
 */
export function storedFit(f: FitResult): FitResult {
  return { ...f, residuals_a: f.residuals_a.map((r) => Number(r.toPrecision(RESIDUAL_DIGITS))) };
}

/** A fit without its per-point residuals (for lists). */
export function fitSummary(f: FitResult): FitSummary {
  const { residuals_a: _dropped, ...rest } = f;
  return rest;
}

/** The API shape of a curve (CLI vocabulary: metrics.isc_a, fits[].rs_ohm, …). */
export function curveJson(c: CurveRow | Omit<CurveRow, 'voltage_v' | 'current_a' | 'notes'>, fits: FitRow[], detail: boolean) {
  const current = fits.filter((f) => f.current).sort((a, b) => a.model.localeCompare(b.model)).reverse();
  return {
    id: c.id,
    batch_id: c.batchId,
    device_id: c.deviceId,
    file_name: c.fileName,
    meta: c.meta,
    metrics: c.metrics,
    flags: c.flags,
    stc: c.stc,
    fits: current.map((f) => ({ ...(detail ? f.result : fitSummary(f.result)), fit_id: f.id, conditions: f.conditions, reason: f.reason, created_at: f.createdAt })),
    status: c.status as 'queued' | 'fitting' | 'done' | 'failed',
    status_reason: c.statusReason,
    created_at: c.createdAt,
    ...(detail
      ? {
          points: { voltage_v: (c as CurveRow).voltage_v, current_a: (c as CurveRow).current_a },
          notes: (c as CurveRow).notes,
          history: fits
            .slice()
            .sort((a, b) => +b.createdAt - +a.createdAt)
            .map((f) => ({
              fit_id: f.id,
              model: f.model,
              current: f.current,
              reason: f.reason,
              conditions: f.conditions,
              rmse_a: f.result.rmse_a,
              converged: f.result.converged,
              created_at: f.createdAt,
            })),
        }
      : {}),
  };
}

/** Curve columns for lists: everything but the measured points. */
export const curveListColumns = (() => {
  const { voltage_v: _v, current_a: _i, notes: _n, ...rest } = getTableColumns(curve);
  return rest;
})();

/** Fits of these curves; `withResiduals` false leaves the per-point residuals in the database. */
export async function fitsFor(db: Db, curveIds: string[], onlyCurrent: boolean, withResiduals = true): Promise<Map<string, FitRow[]>> {
  const out = new Map<string, FitRow[]>();
  if (!curveIds.length) return out;
  const { result: _r, ...fitColumns } = getTableColumns(fit);
  const rows = await db
    .select({ ...fitColumns, result: withResiduals ? fit.result : sql<FitResult>`${fit.result} - 'residuals_a'` })
    .from(fit)
    .where(onlyCurrent ? and(inArray(fit.curveId, curveIds), eq(fit.current, true)) : inArray(fit.curveId, curveIds));
  for (const r of rows) {
    const list = out.get(r.curveId) ?? [];
    list.push(r);
    out.set(r.curveId, list);
  }
  return out;
}

/** The organisation's curve or 404. */
export async function loadCurve(db: Db, organizationId: string, id: string): Promise<CurveRow> {
  const [row] = await db.select().from(curve).where(and(eq(curve.id, id), eq(curve.organizationId, organizationId)));
  if (!row) throw notFound('That curve');
  return row;
}

/** A curve with everything known about it: points, key figures, current fits with residuals, STC figures, fit history, its batch. */
export async function curveDetail(db: Db, organizationId: string, id: string) {
  const row = await loadCurve(db, organizationId, id);
  const fits = (await fitsFor(db, [row.id], false)).get(row.id) ?? [];
  const [b] = await db.select().from(batch).where(eq(batch.id, row.batchId));
  // Each figure's expanded uncertainty (k = 2) from the batch's setup (server/services/setups.ts).
  const setup = await batchSetupRef(db, b);
  const uncertainty = uncertaintyByKey(deviceUncertainty({ pmp_w: row.pmp_w, isc_a: row.isc_a, voc_v: row.voc_v, stc_pmp_w: row.stc_pmp_w }, setup));
  return { ...curveJson(row, fits, true), batch: { id: b.id, name: b.name, state: b.state }, original: await originalInfo(db, row), uncertainty, setup };
}

/**
 * Fits a curve again with another model or corrected metadata (on the analysis threads: a free
 * double-diode fit takes ~100 ms that other requests need not wait for). Earlier fits stay in
 * the history; the new ones become current; key figures, STC figures, the derived columns and
 * the comparison record follow the new metadata, and the batch's revision moves.
 */
export async function refitCurve(db: Db, analyser: Analyser, who: { organizationId: string; userId: string }, id: string, body: ReturnType<typeof refitSchema.parse>) {
  const row = await loadCurve(db, who.organizationId, id);
  const [b] = await db.select().from(batch).where(eq(batch.id, row.batchId));
  // An early answer before the fit is computed; the check that counts is the locked one below.
  assertWritable(b);
  const meta: CurveMeta = { ...row.meta };
  const changed: string[] = [];
  for (const k of ['temp_c', 'irradiance_w_m2', 'cells', 'area_cm2'] as const) {
    const v = body[k];
    if (v != null && v !== meta[k]) {
      meta[k] = v;
      // In the key table's words: "Cell temperature 33 °C → 45 °C".
      changed.push(`${labelOf(k)} ${formatValue(k, row.meta[k] ?? null, 6)} → ${formatValue(k, v, 6)}`);
    }
  }
  const models = body.model === 'both' ? (['single', 'double'] as const) : ([body.model] as const);
  const outcome = await analyser.analyse({ curve: { voltage_v: row.voltage_v, current_a: row.current_a, meta, notes: row.notes }, idealities: body.idealities, models: [...models], coefficients: batchCoefficients(b) });
  if (!outcome.ok) {
    if (outcome.kind === 'input') throw new HttpError(422, outcome.code, outcome.message);
    throw new Error(`refit failed: ${outcome.message}`);
  }
  const analysis = outcome.analysis;
  const reason = `refit${changed.length ? ': ' + changed.join(', ') : ''}${body.idealities === 'free' ? ' (free idealities)' : ''}`;
  await db.transaction(async (tx) => {
    // Released while the fit was computed: nothing is written (409).
    await lockWritableBatch(tx, row.batchId);
    for (const f of analysis.fits) {
      await tx.update(fit).set({ current: false }).where(and(eq(fit.curveId, row.id), eq(fit.model, f.model), eq(fit.current, true)));
    }
    await insertFits(tx, row.id, analysis.fits, analysis.conditions, reason, who.userId);
    // Re-read every current fit so the derived columns use the single-diode fit even when only the double was redone.
    const current = await tx.select().from(fit).where(and(eq(fit.curveId, row.id), eq(fit.current, true)));
    // Without a new single-diode fit the STC outcome is kept (its model method needs that fit).
    const stc = models.includes('single') || !row.stc ? analysis.stc : row.stc;
    const flags = stc === analysis.stc ? analysis.flags : [...analysis.flags.filter((f) => f.code !== 'stc-unavailable'), ...row.flags.filter((f) => f.code === 'stc-unavailable')];
    const cols = derivedColumns({ ...analysis, flags, stc, fits: current.map((x) => x.result) });
    const record = comparisonRecord({ id: row.id, batch_id: row.batchId, device_id: row.deviceId }, { ...analysis, stc }, cols);
    await tx.update(curve).set({ meta, metrics: analysis.metrics, flags, stc, ...cols, record }).where(eq(curve.id, row.id));
    // The batch changed: answers cached against its revision must be computed again.
    await touchBatch(tx, row.batchId);
  });
  const after = await loadCurve(db, who.organizationId, row.id);
  const fits = (await fitsFor(db, [row.id], false)).get(row.id) ?? [];
  return curveJson(after, fits, true);
}
