/**
 * The physics answers (lib/physics/curve-report.ts assembles them): this loads the curve and its
 * current fits and refuses an answer with a value the models could not compute.
 */
import { eq } from 'drizzle-orm';
import type { Db } from '@/db/client';
import { batch } from '@/db/schema';
import { bandDiagramReport, curvePhysicsReport, firstNonFinite, materialReport, translationReport } from '@/lib/physics/curve-report';
import type { CurrentFits } from '@/lib/physics/curve-report';
import type { BandDiagramRequest, CurvePhysicsQuery, MaterialQuery, TranslateRequest } from '@/lib/schemas/physics';
import { HttpError } from '@/server/errors';
import { fitsFor, loadCurve } from '@/server/services/curves';

/** The answer unless a number in it is not finite (then 422 naming where). */
function finiteOnly<T>(body: T): T {
  const bad = firstNonFinite(body);
  if (bad) throw new HttpError(422, 'out_of_range', `${bad.where} came out as ${bad.value}: the inputs are outside what the models can compute.`);
  return body;
}

async function currentFits(db: Db, curveId: string): Promise<CurrentFits> {
  const fits = (await fitsFor(db, [curveId], true)).get(curveId) ?? [];
  return { single: fits.find((f) => f.model === 'single-diode'), double: fits.find((f) => f.model === 'double-diode') };
}

/** Silicon at temp_k with the reference value and the n_i series over the query's range. */
export function material(q: MaterialQuery) {
  return finiteOnly(materialReport(q.temp_k, { from_k: q.from_k, to_k: q.to_k }));
}

/** The band diagram with Fermi–Dirac and Boltzmann statistics side by side. */
export function bandDiagramOf(input: BandDiagramRequest) {
  return finiteOnly(bandDiagramReport(input));
}

/** The physics of the organisation's curve's current fits. */
export async function curvePhysics(db: Db, organizationId: string, curveId: string, range?: CurvePhysicsQuery) {
  const row = await loadCurve(db, organizationId, curveId);
  const fits = await currentFits(db, row.id);
  const [b] = await db.select({ id: batch.id, name: batch.name }).from(batch).where(eq(batch.id, row.batchId));
  return finiteOnly(curvePhysicsReport(row, fits, b ?? null, range));
}

/** The organisation's curve translated to other conditions; 422 when the model method has no fit to use. */
export async function translateStoredCurve(db: Db, organizationId: string, curveId: string, body: TranslateRequest) {
  const row = await loadCurve(db, organizationId, curveId);
  const t = translationReport(row, await currentFits(db, row.id), body);
  if (!t.ok) throw new HttpError(422, 'no_fit', 'The model translation needs a converged single-diode fit of this curve, and it has none. Use an IEC 60891 procedure or refit the curve.');
  return finiteOnly(t.report);
}
