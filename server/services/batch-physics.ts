/**
 * The physics of a batch (GET /api/physics/batches/:id): loads the organisation's batch (another
 * organisation's is a 404), its curves and their current single-diode fits, and hands them to
 * lib/physics/batch-report.ts, which computes J0 per cell area and the implied Voc per device and
 * their distributions.
 */
import { asc, eq } from 'drizzle-orm';
import type { Db } from '@/db/client';
import { curve } from '@/db/schema';
import { batchPhysicsReport } from '@/lib/physics/batch-report';
import type { BatchPhysicsInput } from '@/lib/physics/batch-report';
import { loadBatch } from '@/server/services/batches';
import { fitsFor } from '@/server/services/curves';

/** The batch's J0 and implied Voc per device, with their medians and quartiles. */
export async function batchPhysics(db: Db, organizationId: string, batchId: string) {
  const b = await loadBatch(db, organizationId, batchId);
  const rows = await db
    .select({ id: curve.id, deviceId: curve.deviceId, meta: curve.meta, isc_a: curve.isc_a, voc_v: curve.voc_v, status: curve.status, statusReason: curve.statusReason })
    .from(curve)
    .where(eq(curve.batchId, b.id))
    .orderBy(asc(curve.deviceId), asc(curve.createdAt));
  // Current fits without their per-point residuals: only the parameters and conditions are read.
  const fits = await fitsFor(db, rows.map((r) => r.id), true, false);
  const input: BatchPhysicsInput[] = rows.map((r) => {
    const single = (fits.get(r.id) ?? []).find((f) => f.model === 'single-diode');
    return {
      curve_id: r.id,
      device_id: r.deviceId,
      status: r.status,
      status_reason: r.statusReason,
      meta: r.meta,
      isc_a: r.isc_a,
      voc_v: r.voc_v,
      fit: single ? { result: single.result, conditions: single.conditions } : undefined,
    };
  });
  return batchPhysicsReport({ id: b.id, name: b.name, cells: b.cells, area_cm2: b.area_cm2 }, input);
}
