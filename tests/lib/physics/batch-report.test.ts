/**
 * The batch physics rows (lib/physics/batch-report.ts) for the curves the API test cannot make
 * easily: fits still queued or failed (PostgreSQL mode), a device without cells in its file, and
 * a temperature outside the silicon model. The arithmetic is checked by hand here:
 * J0 = I0/(area/cells); implied Voc = n·Ns·kT/q·ln(Jsc/J0 + 1), CODATA 2018 k and q.
 */
import { batchPhysicsReport, devicePhysics, spreadOf } from '@/lib/physics/batch-report';
import type { BatchPhysicsInput } from '@/lib/physics/batch-report';

const vt25 = (1.380649e-23 * 298.15) / 1.602176634e-19;
const fitted = (over: Partial<BatchPhysicsInput> = {}, conditions: Record<string, unknown> = { temp_c: 25, cells: 60 }): BatchPhysicsInput => ({
  curve_id: 'c1',
  device_id: 'D-1',
  status: 'done',
  status_reason: null,
  meta: { area_cm2: 16610 },
  isc_a: 10.4,
  voc_v: 40.3,
  fit: { result: { model: 'single-diode', converged: true, iph_a: 10.41, i0_a: 2e-10, n: 1.05, rs_ohm: 0.3, rsh_ohm: 500 }, conditions },
  ...over,
});
const defaults = { cells: null, area_cm2: null };

it('computes J0 per cell area and the implied Voc at 25 °C by hand', () => {
  const d = devicePhysics(fitted(), defaults);
  const cellArea = 16610 / 60;
  expect(d.cell_area_cm2).toBeCloseTo(cellArea, 10);
  expect(d.j0_a_cm2! / (2e-10 / cellArea)).toBeCloseTo(1, 12);
  expect(d.implied_voc_v! / (1.05 * 60 * vt25 * Math.log(10.4 / 2e-10 + 1))).toBeCloseTo(1, 12);
  // Measured at 25 °C: nothing to move.
  expect(d.implied_voc_25c_v! / d.implied_voc_v!).toBeCloseTo(1, 12);
  expect(d.reason).toBeNull();
});

it('takes the cells from the fit, then the file, then the batch, and the area from the file, then the batch', () => {
  const d = devicePhysics(fitted({ meta: {} }, { temp_c: 25 }), { cells: 72, area_cm2: 19440 });
  expect([d.cells, d.cell_area_cm2]).toEqual([72, 270]);
});

it.each([
  ['queued', null, /still waiting or running/],
  ['fitting', null, /still waiting or running/],
  ['failed', 'the worker stopped', /Its fit failed: the worker stopped\./],
] as const)('a curve whose fit is %s is listed with the reason and no figures', (status, why, words) => {
  const d = devicePhysics(fitted({ status, status_reason: why, fit: undefined }), defaults);
  expect(d.reason).toMatch(words);
  expect([d.j0_a_cm2, d.implied_voc_v, d.implied_voc_25c_v]).toEqual([null, null, null]);
});

it('a temperature outside the model keeps the fit-temperature figures and says why the 25 °C ones are missing', () => {
  const d = devicePhysics(fitted({}, { temp_c: 260, cells: 60 }), defaults);
  expect(d.implied_voc_v).not.toBeNull();
  expect(d.implied_voc_25c_v).toBeNull();
  expect(d.reason).toMatch(/J0 at 25 °C could not be computed/);
});

it('counts usable devices and leaves the missing out of the spread', () => {
  const r = batchPhysicsReport({ id: 'b', name: 'B', ...defaults }, [fitted(), fitted({ curve_id: 'c2', status: 'queued', fit: undefined })]);
  expect(r.summary).toMatchObject({ total: 2, usable: 1 });
  expect(r.summary.implied_voc_v!.median).toBe(r.devices[0].implied_voc_v);
  // Quartiles by Hyndman & Fan definition 7: [1, 2, 3, 4] → 1.75 and 3.25.
  expect(spreadOf([4, null, 1, 3, 2])).toEqual({ median: 2.5, p25: 1.75, p75: 3.25, min: 1, max: 4 });
  expect(spreadOf([null])).toBeNull();
});
