/**
 * The comparison record stored with each curve: written and read through one field list. Values
 * are invented for this test; J0 per cell area is computed by hand below.
 */
import { COMPARISON_RECORD_FIELDS, comparisonRecordFields, deviceRecordOf, encodeComparisonRecord } from '@/lib/quality/comparison-record';
import type { ComparisonRecordFields } from '@/lib/quality/comparison-record';

const fitted: ComparisonRecordFields = {
  curve_id: 'c1',
  batch_id: 'b1',
  device_id: 'M-01',
  metrics: { isc_a: 9.5, voc_v: 41.2, pmp_w: 300.5 },
  cells: 60,
  area_cm2: 16_500,
  flagCodes: 'step noisy',
  stc_pmp_w: 302.1,
  fitted: true,
  iph_a: 9.51,
  i0_a: 2.75e-9,
  n: 1.1,
  rs_ohm: 0.4,
  rsh_ohm: 350,
  rmse_a: 0.002,
  stc_absent_reason: null,
};

it('writes the fields in the listed order and reads them back by name', () => {
  const stored = JSON.parse(encodeComparisonRecord(fitted)) as unknown[];
  expect(stored).toHaveLength(COMPARISON_RECORD_FIELDS.length);
  // The order migration 0004 backfilled with: id, batch, device, metrics, cells, area, flags, STC Pmax, fitted, Iph, I0, n, Rs, Rsh, RMSE.
  expect(stored.slice(0, 3)).toEqual(['c1', 'b1', 'M-01']);
  expect(stored[8]).toBe(true);
  expect(stored[14]).toBe(0.002);
  // Appended after the 0004 order: why there is no Pmax at STC (null when there is one).
  expect(stored[15]).toBeNull();
  expect(comparisonRecordFields(stored)).toEqual(fitted);
});

it('turns a record into a device with J0 per cell area, and keeps the fit out when it did not converge', () => {
  const d = deviceRecordOf(JSON.parse(encodeComparisonRecord(fitted)));
  expect(d).toMatchObject({ curve_id: 'c1', batch_id: 'b1', device_id: 'M-01', flags: ['step', 'noisy'], fitted: true });
  // By hand: cell area 16,500 / 60 = 275 cm²; J0 = 2.75e-9 / 275 = 1e-11 A/cm².
  expect(d.values.j0_a_cm2).toBeCloseTo(1e-11, 20);
  expect(d.values.pmp_w).toBe(300.5);
  expect(d.values.stc_pmp_w).toBe(302.1);

  const u = deviceRecordOf(JSON.parse(encodeComparisonRecord({ ...fitted, fitted: false, flagCodes: '' })));
  expect(u.fitted).toBe(false);
  expect(u.flags).toEqual([]);
  for (const k of ['iph_a', 'i0_a', 'n', 'rs_ohm', 'rsh_ohm', 'rmse_a', 'j0_a_cm2'] as const) expect(u.values[k]).toBeNull();
  expect(u.values.voc_v).toBe(41.2);
});

it('an absent Pmax at STC carries its reason into the device record; an older record (one field shorter) reads as before', () => {
  const reason = 'the curve has a step (invented for this test)';
  const d = deviceRecordOf(JSON.parse(encodeComparisonRecord({ ...fitted, stc_pmp_w: null, stc_absent_reason: reason })));
  expect(d.values.stc_pmp_w).toBeNull();
  expect(d.absent).toEqual({ stc_pmp_w: reason });
  const older = (JSON.parse(encodeComparisonRecord(fitted)) as unknown[]).slice(0, 15);
  const o = deviceRecordOf(older);
  expect(o.values.stc_pmp_w).toBe(302.1);
  expect(o.absent).toBeUndefined();
});
