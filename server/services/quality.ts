/**
 * From stored curves to the records the quality rules judge (lib/quality), and the spec
 * versions they are judged against. Key names are the engine's (pmp_w, rs_ohm, j0_a_cm2…).
 */
import { and, desc, eq, inArray, sql } from 'drizzle-orm';
import type { Db } from '@/db/client';
import { curve, spec } from '@/db/schema';
import { parseSpec } from '@/lib/quality';
import type { DeviceRecord, ParamKey, Spec } from '@/lib/quality';
import { notFound } from '@/server/errors';

export type DeviceRow = DeviceRecord & { curveId: string; batchId: string; fitted: boolean };

/** Every curve of the given batches as a device record with all engine keys. */
export async function deviceRecords(db: Db, batchIds: string[]): Promise<DeviceRow[]> {
  if (!batchIds.length) return [];
  // One table, no JSON of the fits: the single-diode figures are columns of the curve
  // (server/services/curves.ts derivedColumns), which keeps a 10 × 1,000-curve comparison fast.
  const curves = await db
    .select({
      id: curve.id,
      batchId: curve.batchId,
      deviceId: curve.deviceId,
      metrics: curve.metrics,
      cells: sql<number | null>`(${curve.meta}->>'cells')::int`,
      area: sql<number | null>`(${curve.meta}->>'area_cm2')::float8`,
      flags: curve.flagCodes,
      stc: curve.stc_pmp_w,
      fitted: curve.fitted,
      iph: curve.iph_a,
      i0: curve.i0_a,
      n: curve.n,
      rs: curve.rs_ohm,
      rsh: curve.rsh_ohm,
      rmse: curve.rmse_a,
    })
    .from(curve)
    .where(inArray(curve.batchId, batchIds))
    .orderBy(curve.deviceId);
  return curves.map((c) => {
    const ok = c.fitted;
    const cellArea = c.area ? c.area / (c.cells ?? 1) : null;
    const values: Partial<Record<ParamKey, number | null>> = {
      ...c.metrics,
      iph_a: ok ? c.iph : null,
      i0_a: ok ? c.i0 : null,
      n: ok ? c.n : null,
      rs_ohm: ok ? c.rs : null,
      rsh_ohm: ok ? c.rsh : null,
      rmse_a: ok ? c.rmse : null,
      j0_a_cm2: ok && c.i0 != null && cellArea ? c.i0 / cellArea : null,
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
