/**
 * A batch edit that changes the module type's coefficients changes which STC method holds for
 * its curves (lib/analysis/stc.ts): `editBatch` saves the edit and, when a coefficient changed,
 * works out every curve's STC outcome again from what is stored (points, key figures, flags, the
 * current single-diode fit) in one transaction under the batch lock — STC figures, the
 * "stc-unavailable" flag, Pmax at STC and the comparison record — and moves the batch revision.
 */
import { and, eq, inArray } from 'drizzle-orm';
import type { Db } from '@/db/client';
import { curve, fit } from '@/db/schema';
import { singleParams } from '@/lib/analysis/analyse-file';
import { stcOutcome } from '@/lib/analysis/stc';
import type { batchUpdateSchema } from '@/lib/schemas/curves';
import { stcFiguresOf } from '@/lib/schemas/curves';
import { touchBatch } from '@/server/services/answer-cache';
import { lockWritableBatch } from '@/server/services/batch-lock';
import { batchCoefficients, batchJson, loadBatch, updateBatch } from '@/server/services/batches';
import { comparisonRecord } from '@/server/services/curves';

/** Batch fields the STC outcome of its curves depends on. */
const STC_FIELDS = ['alpha_pct_per_k', 'beta_pct_per_k', 'gamma_pct_per_k', 'rs_ohm', 'kappa_ohm_per_k'] as const;

/** PATCH /api/batches/:id: the edit, then the curves' STC figures when a coefficient changed. */
export async function editBatch(db: Db, organizationId: string, id: string, input: ReturnType<typeof batchUpdateSchema.parse>) {
  const before = await loadBatch(db, organizationId, id);
  const after = await updateBatch(db, organizationId, id, input);
  const changed = STC_FIELDS.some((k) => input[k] !== undefined && input[k] !== before[k]);
  if (!changed || after.archived || after.state === 'released') return after;
  return (await refreshBatchStc(db, id)) ?? after;
}

/** Every curve of the batch gets its STC outcome again with the batch's current coefficients. */
export async function refreshBatchStc(db: Db, batchId: string) {
  return db.transaction(async (tx) => {
    const b = await lockWritableBatch(tx, batchId);
    const coefficients = batchCoefficients(b);
    const rows = await tx.select().from(curve).where(eq(curve.batchId, batchId));
    if (!rows.length) return null;
    const singles = await tx
      .select({ curveId: fit.curveId, result: fit.result, conditions: fit.conditions })
      .from(fit)
      .where(and(inArray(fit.curveId, rows.map((r) => r.id)), eq(fit.current, true), eq(fit.model, 'single-diode')));
    const byCurve = new Map(singles.map((s) => [s.curveId, s]));
    for (const row of rows) {
      const s = byCurve.get(row.id);
      const cond = (s?.conditions ?? {}) as { cells?: unknown };
      const cells = typeof cond.cells === 'number' && cond.cells >= 1 ? cond.cells : (row.meta.cells ?? 1);
      const flags = row.flags.filter((f) => f.code !== 'stc-unavailable');
      const c = { voltage_v: row.voltage_v, current_a: row.current_a, meta: row.meta, notes: row.notes };
      const stc = stcOutcome({ curve: c, metrics: row.metrics, flags, params: singleParams(s ? [s.result] : []), cells, coefficients });
      if (stc.method === 'none') flags.push({ code: 'stc-unavailable', severity: 'warn', message: `No STC figures: ${stc.reason}` });
      const flagCodes = flags.map((f) => f.code).join(' ');
      const stc_pmp_w = stcFiguresOf(stc)?.pmp_w ?? null;
      const record = comparisonRecord(
        { id: row.id, batch_id: row.batchId, device_id: row.deviceId },
        { curve: c, metrics: row.metrics, stc },
        { ...derivedOf(row), flagCodes, stc_pmp_w },
      );
      await tx.update(curve).set({ stc, flags, flagCodes, stc_pmp_w, record }).where(eq(curve.id, row.id));
    }
    const [u] = await touchBatch(tx, batchId);
    return batchJson(u);
  });
}

/** The stored derived columns of a curve, as `derivedColumns` wrote them. */
function derivedOf(row: typeof curve.$inferSelect) {
  return {
    isc_a: row.isc_a,
    voc_v: row.voc_v,
    pmp_w: row.pmp_w,
    ff: row.ff,
    efficiency: row.efficiency,
    n: row.n,
    rs_ohm: row.rs_ohm,
    rsh_ohm: row.rsh_ohm,
    stc_pmp_w: row.stc_pmp_w,
    iph_a: row.iph_a,
    i0_a: row.i0_a,
    rmse_a: row.rmse_a,
    fitted: row.fitted,
    flagCodes: row.flagCodes,
  };
}
