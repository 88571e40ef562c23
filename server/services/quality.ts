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

type RecordTuple = [
  id: string,
  batchId: string,
  deviceId: string,
  metrics: Partial<Record<ParamKey, number | null>>,
  cells: number | null,
  area_cm2: number | null,
  flags: string,
  stc: number | null,
  fitted: boolean,
  iph: number | null,
  i0: number | null,
  n: number | null,
  rs: number | null,
  rsh: number | null,
  rmse: number | null,
];

const num = (v: unknown): number | null => (typeof v === 'number' && Number.isFinite(v) ? v : null);

/** Every curve of the given batches as a device record with all engine keys, ordered by device. */
export async function deviceRecords(db: Db, batchIds: string[]): Promise<DeviceRow[]> {
  if (!batchIds.length) return [];
  // One table, no JSON of the fits, and one field in all: each curve keeps its comparison record
  // as JSON text (comparisonRecord in server/services/curves.ts). PGlite's reader costs per
  // field: 10,000 rows × 15 columns took ~650 ms, this ~100 ms with parsing (measured).
  const fallback = sql`json_build_array(${curve.id}, ${curve.batchId}, ${curve.deviceId}, ${curve.metrics}, (${curve.meta}->>'cells')::int, (${curve.meta}->>'area_cm2')::float8, ${curve.flagCodes}, ${curve.stc_pmp_w}, ${curve.fitted}, ${curve.iph_a}, ${curve.i0_a}, ${curve.n}, ${curve.rs_ohm}, ${curve.rsh_ohm}, ${curve.rmse_a})::text`;
  const result = await db.execute<{ j: string | null }>(sql`
    select '[' || string_agg(coalesce(${curve.record}, ${fallback}), ',' order by ${curve.deviceId}) || ']' as j
    from ${curve} where ${inArray(curve.batchId, batchIds)}`);
  const text = result.rows[0]?.j;
  const tuples: RecordTuple[] = text ? JSON.parse(text) : [];
  return tuples.map(([id, batchId, deviceId, metrics, cells, area, flags, stc, fitted, iph, i0, n, rs, rsh, rmse]) => {
    const ok = fitted === true;
    const cellArea = num(area) ? (area as number) / (num(cells) ?? 1) : null;
    // Filled in place (an object spread per row costs more than the query here).
    const values: Partial<Record<ParamKey, number | null>> = metrics;
    values.iph_a = ok ? num(iph) : null;
    values.i0_a = ok ? num(i0) : null;
    values.n = ok ? num(n) : null;
    values.rs_ohm = ok ? num(rs) : null;
    values.rsh_ohm = ok ? num(rsh) : null;
    values.rmse_a = ok ? num(rmse) : null;
    values.j0_a_cm2 = ok && num(i0) != null && cellArea ? (i0 as number) / cellArea : null;
    values.stc_pmp_w = num(stc);
    return { curveId: id, batchId, deviceId, values, flags: flags.split(' ').filter(Boolean), fitted: ok };
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
