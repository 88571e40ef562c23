/**
 * A curve's comparison record: the figures the comparison, the evaluation and the pass/fail
 * export judge a device by, stored with each curve as one JSON array (`curve.record`). Reading
 * 10,000 curves as one text instead of 150,000 fields is what keeps the comparison fast on
 * PGlite, whose reader costs per field. This file is the one definition of that array: its
 * field order and meaning (COMPARISON_RECORD_FIELDS), how it is written (encodeComparisonRecord,
 * server/services/curves.ts) and read back into a device record (deviceRecordOf,
 * server/services/quality.ts, which also builds the same array in SQL for curves without one).
 * Migration 0004 backfilled older curves with this order; a change of order needs a migration
 * that rewrites `curve.record`.
 */
import type { DeviceRecord } from '@/lib/quality/evaluate';
import type { ParamKey } from '@/lib/quality/params';

/** The fields of a record, in their order in the stored array. */
export const COMPARISON_RECORD_FIELDS = [
  /** curve.id */
  'curve_id',
  /** batch.id */
  'batch_id',
  /** the device id (file metadata, else the file name) */
  'device_id',
  /** the measured key figures (lib/iv key figures: isc_a, voc_v, pmp_w, …) */
  'metrics',
  /** cells in series (metadata), null when unknown */
  'cells',
  /** device area, cm² (metadata), null when unknown */
  'area_cm2',
  /** the flag codes, space-separated */
  'flagCodes',
  /** Pmax translated to STC, W, null without a converged fit */
  'stc_pmp_w',
  /** whether a single-diode fit converged; the five parameters and RMSE below are null otherwise */
  'fitted',
  'iph_a',
  'i0_a',
  'n',
  'rs_ohm',
  'rsh_ohm',
  'rmse_a',
  /** why there is no Pmax at STC, in words (lib/analysis/stc.ts); null when there is one. Appended last, so older records (one field shorter) read it as null. */
  'stc_absent_reason',
] as const;

export type ComparisonRecordField = (typeof COMPARISON_RECORD_FIELDS)[number];

/** A record by name. */
export type ComparisonRecordFields = {
  curve_id: string;
  batch_id: string;
  device_id: string;
  metrics: Partial<Record<ParamKey, number | null>>;
  cells: number | null;
  area_cm2: number | null;
  flagCodes: string;
  stc_pmp_w: number | null;
  fitted: boolean;
  iph_a: number | null;
  i0_a: number | null;
  n: number | null;
  rs_ohm: number | null;
  rsh_ohm: number | null;
  rmse_a: number | null;
  stc_absent_reason: string | null;
};

type ValuesOf<T extends readonly ComparisonRecordField[]> = { -readonly [K in keyof T]: ComparisonRecordFields[T[K] & ComparisonRecordField] };

/** A record as stored: the values in COMPARISON_RECORD_FIELDS order. */
export type ComparisonRecordTuple = ValuesOf<typeof COMPARISON_RECORD_FIELDS>;

/** The JSON text stored in `curve.record`. */
export function encodeComparisonRecord(fields: ComparisonRecordFields): string {
  return JSON.stringify(COMPARISON_RECORD_FIELDS.map((k) => fields[k]));
}

/** A stored array back into named fields. */
export function comparisonRecordFields(tuple: ComparisonRecordTuple | readonly unknown[]): ComparisonRecordFields {
  const out: Record<string, unknown> = {};
  for (let k = 0; k < COMPARISON_RECORD_FIELDS.length; k++) out[COMPARISON_RECORD_FIELDS[k]] = tuple[k];
  return out as ComparisonRecordFields;
}

/** A device as the quality rules judge it, with the curve and batch it came from. */
export type ComparisonDevice = DeviceRecord & { curve_id: string; batch_id: string; fitted: boolean; /** cells in series, null when the device does not say */ cells: number | null };

const num = (v: unknown): number | null => (typeof v === 'number' && Number.isFinite(v) ? v : null);

/**
 * The device record of a stored record: the measured figures, the single-diode parameters only
 * when the fit converged, J0 per cell area (I0 / (area / cells)) and Pmax at STC.
 */
export function deviceRecordOf(tuple: ComparisonRecordTuple | readonly unknown[]): ComparisonDevice {
  const r = comparisonRecordFields(tuple);
  const ok = r.fitted === true;
  const area = num(r.area_cm2);
  const cellArea = area ? area / (num(r.cells) ?? 1) : null;
  const i0 = num(r.i0_a);
  // The metrics object is fresh from JSON.parse and used only here: filled in place.
  const values: Partial<Record<ParamKey, number | null>> = r.metrics ?? {};
  values.iph_a = ok ? num(r.iph_a) : null;
  values.i0_a = ok ? i0 : null;
  values.n = ok ? num(r.n) : null;
  values.rs_ohm = ok ? num(r.rs_ohm) : null;
  values.rsh_ohm = ok ? num(r.rsh_ohm) : null;
  values.rmse_a = ok ? num(r.rmse_a) : null;
  values.j0_a_cm2 = ok && i0 != null && cellArea ? i0 / cellArea : null;
  values.stc_pmp_w = num(r.stc_pmp_w);
  const absent = values.stc_pmp_w === null && typeof r.stc_absent_reason === 'string' && r.stc_absent_reason ? { stc_pmp_w: r.stc_absent_reason } : undefined;
  return { curve_id: r.curve_id, batch_id: r.batch_id, device_id: r.device_id, values, flags: r.flagCodes.split(' ').filter(Boolean), fitted: ok, cells: num(r.cells), ...(absent ? { absent } : {}) };
}
