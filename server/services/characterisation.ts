/**
 * A device type's characterisation from a batch's curves of one device (lib/analysis/characterise):
 * loads the curves (the caller's batch or 404; `device=*` takes every curve of the batch, for runs whose files name no device), takes each curve's irradiance and cell temperature
 * from its metadata (the batch's irradiance when the file gave none) and hands them to the engine.
 * Saving the coefficients on the batch is the batch edit (PATCH /api/batches/:id), which also works
 * the STC figures out again — an explicit action on the screen, never done here.
 */
import { asc, eq } from 'drizzle-orm';
import type { Db } from '@/db/client';
import { curve } from '@/db/schema';
import { characterise } from '@/lib/analysis/characterise';
import type { CharCurve } from '@/lib/analysis/characterise';
import type { CharacterisationAnswer } from '@/lib/schemas/characterisation-answer';
import { loadBatch } from '@/server/services/batches';

/** The `device` that asks for every curve of the batch (a characterisation run whose files name no device, so each got its own). */
export const ALL_DEVICES = '*';

/** At most this many curves of one device are characterised (the fits cost per curve and grid point). */
export const MAX_CHARACTERISATION_CURVES = 200;

export async function batchCharacterisation(db: Db, organizationId: string, batchId: string, deviceId: string | undefined): Promise<CharacterisationAnswer> {
  const b = await loadBatch(db, organizationId, batchId);
  const rows = await db
    .select({ id: curve.id, deviceId: curve.deviceId, fileName: curve.fileName, meta: curve.meta, voltage_v: curve.voltage_v, current_a: curve.current_a, metrics: curve.metrics })
    .from(curve)
    .where(eq(curve.batchId, b.id))
    .orderBy(asc(curve.createdAt), asc(curve.id));
  const counts = new Map<string, number>();
  for (const r of rows) counts.set(r.deviceId, (counts.get(r.deviceId) ?? 0) + 1);
  const devices = [...counts].map(([device_id, curves]) => ({ device_id, curves })).sort((x, y) => y.curves - x.curves || x.device_id.localeCompare(y.device_id));
  const all = deviceId === ALL_DEVICES;
  const device = all ? ALL_DEVICES : deviceId && counts.has(deviceId) ? deviceId : (devices[0]?.device_id ?? null);
  const base = { batch: { id: b.id, name: b.name }, device_id: device, devices };
  if (deviceId && !all && !counts.has(deviceId)) return { ...base, device_id: null, sources: [], characterisation: null, reason: `The batch has no curves of device ${deviceId}.` };
  const mine = rows.filter((r) => all || r.deviceId === device).slice(0, MAX_CHARACTERISATION_CURVES);
  const sources = mine.map((r) => ({ curve_id: r.id, file_name: r.fileName, irradiance_w_m2: r.meta.irradiance_w_m2 ?? b.irradiance_w_m2 ?? null, temp_c: r.meta.temp_c ?? null }));
  const curves: CharCurve[] = [];
  const missing: string[] = [];
  for (const r of mine) {
    const g = r.meta.irradiance_w_m2 ?? b.irradiance_w_m2;
    const t = r.meta.temp_c;
    if (g == null || t == null) {
      missing.push(r.fileName);
      continue;
    }
    curves.push({ id: r.id, irradiance_w_m2: g, temp_c: t, voltage_v: r.voltage_v, current_a: r.current_a, metrics: r.metrics, cells: r.meta.cells, area_cm2: r.meta.area_cm2 ?? b.area_cm2 ?? undefined });
  }
  const out = characterise(curves, { device: all ? null : device });
  const skipped = missing.length ? ` ${missing.length} curve${missing.length === 1 ? '' : 's'} without an irradiance or cell temperature left out (${missing.slice(0, 3).join(', ')}${missing.length > 3 ? ', …' : ''}).` : '';
  if ('error' in out) return { ...base, sources, characterisation: null, reason: `No characterisation: ${out.error}.${skipped}` };
  if (skipped) out.notes.push(skipped.trim());
  return { ...base, sources, characterisation: out, reason: null };
}
