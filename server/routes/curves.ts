import { and, eq } from 'drizzle-orm';
import { Router } from 'express';
import type { Db } from '@/db/client';
import { batch, curve, fit } from '@/db/schema';
import type { CurveMeta } from '@/lib/iv';
import { refitSchema } from '@/lib/schemas/curves';
import { assertWritable } from '@/server/routes/batches';
import { HttpError, notFound } from '@/server/errors';
import { callerOf, requirePermission } from '@/server/permissions';
import { inlineAnalyser } from '@/server/services/analysis-pool';
import type { Analyser } from '@/server/services/analysis-pool';
import { touchBatch } from '@/server/services/answer-cache';
import { comparisonRecord, curveJson, derivedColumns, fitsFor, insertFits } from '@/server/services/curves';
import { validate } from '@/server/validate';

/** /api/curves — one curve with everything known about it, and refits. */
export function curvesRouter(db: Db, analyser: Analyser = inlineAnalyser()): Router {
  const r = Router();

  async function load(req: Parameters<typeof callerOf>[0]) {
    const c = callerOf(req);
    const [row] = await db.select().from(curve).where(and(eq(curve.id, String(req.params.id)), eq(curve.organizationId, c.organization.id)));
    if (!row) throw notFound('That curve');
    return row;
  }

  /** GET /api/curves/:id — points, key figures, current fits with residuals, STC figures, fit history. */
  r.get('/:id', requirePermission('batch:read'), async (req, res) => {
    const row = await load(req);
    const fits = (await fitsFor(db, [row.id], false)).get(row.id) ?? [];
    const [b] = await db.select({ id: batch.id, name: batch.name, state: batch.state }).from(batch).where(eq(batch.id, row.batchId));
    res.json({ ...curveJson(row, fits, true), batch: b });
  });

  /**
   * POST /api/curves/:id/refit — fit again with another model or corrected metadata. Earlier fits
   * stay in the history; the new ones become current. Key figures and STC figures follow the new metadata.
   */
  r.post('/:id/refit', requirePermission('batch:write'), validate(refitSchema), async (req, res) => {
    const c = callerOf(req);
    const row = await load(req);
    const [b] = await db.select().from(batch).where(eq(batch.id, row.batchId));
    assertWritable(b);
    const body = req.body as ReturnType<typeof refitSchema.parse>;
    const meta: CurveMeta = { ...row.meta };
    const changed: string[] = [];
    for (const k of ['tempC', 'irradiance_Wm2', 'cells', 'area_cm2'] as const) {
      const v = body[k];
      if (v != null && v !== meta[k]) {
        meta[k] = v;
        changed.push(`${k} ${row.meta[k] ?? '—'} → ${v}`);
      }
    }
    const models = body.model === 'both' ? (['single', 'double'] as const) : ([body.model] as const);
    // On the analysis threads: a free double-diode fit takes ~100 ms that other requests need not wait for.
    const outcome = await analyser.analyse({ curve: { voltage_V: row.voltage_V, current_A: row.current_A, meta, notes: row.notes }, idealities: body.idealities, models: [...models] });
    if (!outcome.ok) {
      if (outcome.kind === 'input') throw new HttpError(422, outcome.code, outcome.message);
      throw new Error(`refit failed: ${outcome.message}`);
    }
    const analysis = outcome.analysis;
    const reason = `refit${changed.length ? ': ' + changed.join(', ') : ''}${body.idealities === 'free' ? ' (free idealities)' : ''}`;
    await db.transaction(async (tx) => {
      for (const f of analysis.fits) {
        await tx.update(fit).set({ current: false }).where(and(eq(fit.curveId, row.id), eq(fit.model, f.model), eq(fit.current, true)));
      }
      await insertFits(tx, row.id, analysis.fits, analysis.conditions, reason, c.user.id);
      // Re-read every current fit so the derived columns use the single-diode fit even when only the double was redone.
      const current = await tx.select().from(fit).where(and(eq(fit.curveId, row.id), eq(fit.current, true)));
      const all = current.map((x) => x.result);
      const cols = derivedColumns({ ...analysis, fits: all });
      const record = comparisonRecord({ id: row.id, batchId: row.batchId, deviceId: row.deviceId }, analysis, cols);
      await tx.update(curve).set({ meta, metrics: analysis.metrics, flags: analysis.flags, stc: analysis.stc ?? row.stc, ...cols, record }).where(eq(curve.id, row.id));
      // The batch changed: answers cached against its revision must be computed again.
      await touchBatch(tx, row.batchId);
    });
    const [after] = await db.select().from(curve).where(eq(curve.id, row.id));
    const fits = (await fitsFor(db, [row.id], false)).get(row.id) ?? [];
    res.json(curveJson(after, fits, true));
  });

  return r;
}
