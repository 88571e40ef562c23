/**
 * Storing and reading curves. Every curve is written with its fits in one transaction, so a
 * reader (or a restart after a crash) sees either the whole curve or nothing of it.
 */
import { and, eq, getTableColumns, inArray, sql } from 'drizzle-orm';
import type { Db } from '@/db/client';
import { curve, fit } from '@/db/schema';
import { touchBatch } from '@/server/services/answer-cache';
import type { FileAnalysis } from '@/lib/analysis/analyse-file';
import { isSingleDiodeFit } from '@/lib/iv';
import type { FitResult, FitSummary } from '@/lib/iv';

type Tx = Parameters<Parameters<Db['transaction']>[0]>[0];
type CurveRow = typeof curve.$inferSelect;
type FitRow = typeof fit.$inferSelect;

/** Which curve a comparison record is of. */
export type CurveKey = { id: string; batchId: string; deviceId: string };

/**
 * A curve's comparison record, JSON: [curve id, batch id, device id, metrics, cells, area_cm2,
 * flag codes, STC Pmax, fitted, Iph, I0, n, Rs, Rsh, RMSE] (single-diode figures only when
 * fitted). deviceRecords in server/services/quality.ts reads 10,000 of these as one text instead
 * of 150,000 fields; migration 0004 and its fallback build the same array in SQL.
 */
export function comparisonRecord(key: CurveKey, a: Pick<FileAnalysis, 'curve' | 'metrics'>, d: ReturnType<typeof derivedColumns>): string {
  const meta = a.curve.meta;
  return JSON.stringify([key.id, key.batchId, key.deviceId, a.metrics, meta.cells ?? null, meta.area_cm2 ?? null, d.flagCodes, d.stc_pmp_w, d.fitted, d.iph_a, d.i0_a, d.n, d.rs_ohm, d.rsh_ohm, d.rmse_a]);
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
    stc_pmp_w: a.stc?.pmp_w ?? null,
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

/** One analysed curve to store; `id` is chosen by the caller so it can answer before the write. */
export type CurveToStore = { id: string; fileName: string; analysis: FileAnalysis; replaceIds?: string[] };

/**
 * Inserts analysed curves and their fits in one transaction (a multi-row insert: about three
 * times cheaper a curve than one transaction each), deleting the curves they replace and marking
 * the batch changed. A reader, or a restart after a crash, sees all of the group or none of it.
 */
export async function storeCurves(db: Db, target: { organizationId: string; batchId: string; userId: string | null }, items: CurveToStore[]): Promise<void> {
  if (!items.length) return;
  const replaced = [...new Set(items.flatMap((x) => x.replaceIds ?? []))];
  await db.transaction(async (tx) => {
    if (replaced.length) await tx.delete(curve).where(and(inArray(curve.id, replaced), eq(curve.batchId, target.batchId)));
    await tx.insert(curve).values(
      items.map(({ id, fileName, analysis: a }) => {
        const deviceId = a.curve.meta.deviceId ?? fileName;
        const derived = derivedColumns(a);
        return {
          id,
          organizationId: target.organizationId,
          batchId: target.batchId,
          deviceId,
          fileName,
          meta: a.curve.meta,
          voltage_V: a.curve.voltage_V,
          current_A: a.curve.current_A,
          notes: a.curve.notes,
          metrics: a.metrics,
          flags: a.flags,
          stc: a.stc,
          createdBy: target.userId,
          createdAt: nextStamp(),
          ...derived,
          record: comparisonRecord({ id, batchId: target.batchId, deviceId }, a, derived),
        };
      }),
    );
    const fits = items.flatMap(({ id, analysis: a }) =>
      a.fits.map((f) => ({ id: crypto.randomUUID(), curveId: id, model: f.model, current: true, result: f, conditions: a.conditions, reason: 'upload', createdBy: target.userId })),
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
    fits.map((f) => ({ id: crypto.randomUUID(), curveId, model: f.model, current: true, result: f, conditions, reason, createdBy: userId })),
  );
}

/** A fit without its per-point residuals (for lists). */
export function fitSummary(f: FitResult): FitSummary {
  const { residuals_a: _dropped, ...rest } = f;
  return rest;
}

/** The API shape of a curve (CLI vocabulary: metrics.isc_a, fits[].rs_ohm, …). */
export function curveJson(c: CurveRow | Omit<CurveRow, 'voltage_V' | 'current_A' | 'notes'>, fits: FitRow[], detail: boolean) {
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
    created_at: c.createdAt,
    ...(detail
      ? {
          points: { voltage_V: (c as CurveRow).voltage_V, current_A: (c as CurveRow).current_A },
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
  const { voltage_V: _v, current_A: _i, notes: _n, ...rest } = getTableColumns(curve);
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
