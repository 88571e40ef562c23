/**
 * From stored curves to the device records the quality rules judge (lib/quality). Key names are
 * the engine's (pmp_w, rs_ohm, j0_a_cm2…).
 */
import { inArray, sql } from 'drizzle-orm';
import type { SQL } from 'drizzle-orm';
import type { Db } from '@/db/client';
import { curve } from '@/db/schema';
import { COMPARISON_RECORD_FIELDS, deviceRecordOf } from '@/lib/quality/comparison-record';
import type { ComparisonDevice, ComparisonRecordField, ComparisonRecordTuple } from '@/lib/quality/comparison-record';

export type DeviceRow = ComparisonDevice;

/**
 * The comparison record built from a curve's columns, for curves stored before `curve.record`
 * existed (migration 0004 backfilled them the same way). One SQL expression per field of
 * lib/quality/comparison-record.ts, joined in its order.
 */
const RECORD_FROM_COLUMNS: Record<ComparisonRecordField, SQL> = {
  curve_id: sql`${curve.id}`,
  batch_id: sql`${curve.batchId}`,
  device_id: sql`${curve.deviceId}`,
  metrics: sql`${curve.metrics}`,
  cells: sql`(${curve.meta}->>'cells')::int`,
  area_cm2: sql`(${curve.meta}->>'area_cm2')::float8`,
  flagCodes: sql`${curve.flagCodes}`,
  stc_pmp_w: sql`${curve.stc_pmp_w}`,
  fitted: sql`${curve.fitted}`,
  iph_a: sql`${curve.iph_a}`,
  i0_a: sql`${curve.i0_a}`,
  n: sql`${curve.n}`,
  rs_ohm: sql`${curve.rs_ohm}`,
  rsh_ohm: sql`${curve.rsh_ohm}`,
  rmse_a: sql`${curve.rmse_a}`,
  stc_absent_reason: sql`(case when ${curve.stc}->>'method' = 'none' then ${curve.stc}->>'reason' else null end)`,
};
const recordFromColumns = sql`json_build_array(${sql.join(
  COMPARISON_RECORD_FIELDS.map((k) => RECORD_FROM_COLUMNS[k]),
  sql`, `,
)})::text`;

/** Every curve of the given batches as a device record with all engine keys, ordered by device. */
export async function deviceRecords(db: Db, batchIds: string[]): Promise<DeviceRow[]> {
  if (!batchIds.length) return [];
  return recordsWhere(db, inArray(curve.batchId, batchIds));
}

/** The device records of these curves (any order); a batch page judges only the curves it shows. */
export async function deviceRecordsOfCurves(db: Db, curveIds: string[]): Promise<DeviceRow[]> {
  if (!curveIds.length) return [];
  return recordsWhere(db, inArray(curve.id, curveIds));
}

async function recordsWhere(db: Db, where: SQL): Promise<DeviceRow[]> {
  // One table, no JSON of the fits, and one field in all: each curve keeps its comparison record
  // as JSON text. PGlite's reader costs per field: 10,000 rows × 15 columns took ~650 ms, this
  // ~100 ms with parsing (measured).
  const result = await db.execute<{ j: string | null }>(sql`
    select '[' || string_agg(coalesce(${curve.record}, ${recordFromColumns}), ',' order by ${curve.deviceId}) || ']' as j
    from ${curve} where ${where}`);
  const text = result.rows[0]?.j;
  const tuples: ComparisonRecordTuple[] = text ? JSON.parse(text) : [];
  return tuples.map(deviceRecordOf);
}
