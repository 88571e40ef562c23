/**
 * From stored curves to the records the quality rules judge (lib/quality), and the spec
 * versions they are judged against. Key names are the engine's (pmp_w, rs_ohm, j0_a_cm2…).
 */
import { and, desc, eq, inArray, sql } from 'drizzle-orm';
import type { Db } from '@/db/client';
import { curve, fit, spec } from '@/db/schema';
import type { FitResult } from '@/lib/iv/types';
import { parseSpec } from '@/lib/quality';
import type { DeviceRecord, ParamKey, Spec } from '@/lib/quality';
import { notFound } from '@/server/errors';

export type DeviceRow = DeviceRecord & { curveId: string; batchId: string; fitted: boolean };

/** Every curve of the given batches as a device record with all engine keys. */
export async function deviceRecords(db: Db, batchIds: string[]): Promise<DeviceRow[]> {
  if (!batchIds.length) return [];
  const curves = await db
    .select({ id: curve.id, batchId: curve.batchId, deviceId: curve.deviceId, metrics: curve.metrics, meta: curve.meta, flags: curve.flagCodes, stc: curve.stc_pmp_w })
    .from(curve)
    .where(inArray(curve.batchId, batchIds))
    .orderBy(curve.deviceId);
  const fits = curves.length
    ? await db
        // Leave the per-point residuals in the database: a 10,000-curve comparison needs only the parameters.
        .select({ curveId: fit.curveId, result: sql<FitResult>`${fit.result} - 'residuals_a'` })
        .from(fit)
        .where(and(inArray(fit.curveId, curves.map((c) => c.id)), eq(fit.current, true), eq(fit.model, 'single-diode')))
    : [];
  const single = new Map<string, FitResult>(fits.map((f) => [f.curveId, f.result]));
  return curves.map((c) => {
    const f = single.get(c.id);
    const ok = !!f?.converged;
    const cells = c.meta.cells ?? 1;
    const cellArea = c.meta.area_cm2 ? c.meta.area_cm2 / cells : null;
    const values: Partial<Record<ParamKey, number | null>> = {
      ...c.metrics,
      iph_a: ok ? f!.iph_a : null,
      i0_a: ok ? (f!.i0_a ?? null) : null,
      n: ok ? (f!.n ?? null) : null,
      rs_ohm: ok ? f!.rs_ohm : null,
      rsh_ohm: ok ? f!.rsh_ohm : null,
      rmse_a: ok ? f!.rmse_a : null,
      j0_a_cm2: ok && f!.i0_a != null && cellArea ? f!.i0_a / cellArea : null,
      stc_pmp_w: c.stc,
    };
    return { curveId: c.id, batchId: c.batchId, deviceId: c.deviceId, values, flags: c.flags.split(' ').filter(Boolean), fitted: ok };
  });
}

export type SpecRow = typeof spec.$inferSelect;

/** One spec version of the caller's organisation, parsed; 404 otherwise. */
export async function loadSpec(db: Db, organizationId: string, id: string): Promise<{ row: SpecRow; spec: Spec }> {
  const [row] = await db.select().from(spec).where(and(eq(spec.id, id), eq(spec.organizationId, organizationId)));
  if (!row) throw notFound('That spec');
  return { row, spec: parseSpec(row.body) };
}

/** The newest version of every spec family of an organisation. */
export async function latestSpecs(db: Db, organizationId: string): Promise<SpecRow[]> {
  const rows = await db.select().from(spec).where(eq(spec.organizationId, organizationId)).orderBy(desc(spec.version));
  const seen = new Set<string>();
  return rows.filter((r) => (seen.has(r.familyId) ? false : (seen.add(r.familyId), true))).sort((a, b) => a.name.localeCompare(b.name));
}

/** The differences between two spec bodies, in words, for the version history. */
export function describeChanges(before: Spec | null, after: Spec): string[] {
  if (!before) return ['first version'];
  const out: string[] = [];
  if (before.name !== after.name) out.push(`renamed from “${before.name}”`);
  const keys = new Set([...Object.keys(before.limits ?? {}), ...Object.keys(after.limits ?? {})]) as Set<ParamKey>;
  for (const k of keys) {
    const a = before.limits?.[k];
    const b = after.limits?.[k];
    const show = (l?: { min?: number; max?: number }) => (l ? `${l.min ?? '−∞'} … ${l.max ?? '+∞'}` : 'none');
    if (JSON.stringify(a ?? null) !== JSON.stringify(b ?? null)) out.push(`${k}: ${show(a)} → ${show(b)}`);
  }
  if (JSON.stringify(before.powerClasses ?? null) !== JSON.stringify(after.powerClasses ?? null)) out.push('power classes changed');
  const fa = [...(before.failFlags ?? [])].sort().join(', ');
  const fb = [...(after.failFlags ?? [])].sort().join(', ');
  if (fa !== fb) out.push(`failing flags: ${fa || 'none'} → ${fb || 'none'}`);
  if ((before.notes ?? '') !== (after.notes ?? '')) out.push('notes changed');
  return out.length ? out : ['saved without changes'];
}
