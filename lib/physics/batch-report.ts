/**
 * The physics of a whole batch (pure: stored values in, JSON-ready answer out): for each curve,
 * J0 per cell area from its current single-diode fit and the implied Voc of the device,
 * (n·Ns·k_BT/q)·ln(Jsc/J0 + 1), at the measured temperature and at 25 °C, and the batch's
 * distributions of both (median and quartiles). J0 at 25 °C is the fitted J0 moved by the n_i law
 * I0(T) ∝ n_i(T)^(2/n) (lib/physics/fit-physics.ts, n_i of silicon from lib/physics/materials.ts);
 * Jsc is the measured one at the measured irradiance. A curve without a usable fit stays in the
 * list with the reason in words. server/services/batch-physics.ts loads the rows.
 */
import type { FitResult } from '@/lib/iv';
import { singleDiodeParamsOf } from '@/lib/iv/fit-params';
import { STC } from '@/lib/physics/constants';
import { PhysicsError } from '@/lib/physics/errors';
import { cellAreaOf, i0AtTemperature, impliedVocFromJ0, j0FromI0 } from '@/lib/physics/fit-physics';
import { percentileSorted } from '@/lib/quality/describe';

/** One stored curve of the batch with its current single-diode fit (undefined: none stored). */
export type BatchPhysicsInput = {
  curve_id: string;
  device_id: string;
  /** Fit status of the curve (queued | fitting | done | failed) and why it failed. */
  status: string;
  status_reason: string | null;
  meta: { temp_c?: number | null; cells?: number | null; area_cm2?: number | null };
  isc_a: number;
  voc_v: number;
  fit?: { result: Pick<FitResult, 'model' | 'converged'> & Partial<FitResult>; conditions: Record<string, unknown> };
};

/** What the batch says for curves whose files do not. */
export type BatchPhysicsDefaults = { cells: number | null; area_cm2: number | null };

/** One curve's row of the answer; `reason` says in words what could not be computed, null when everything was. */
export type BatchPhysicsDevice = {
  device_id: string;
  curve_id: string;
  temp_c: number | null;
  cells: number | null;
  cell_area_cm2: number | null;
  n: number | null;
  isc_a: number;
  jsc_a_cm2: number | null;
  j0_a_cm2: number | null;
  j0_25c_a_cm2: number | null;
  measured_voc_v: number;
  implied_voc_v: number | null;
  implied_voc_25c_v: number | null;
  reason: string | null;
};

/** Median, quartiles and range of one quantity over the devices that have it; null with none. */
export type Spread = { median: number; p25: number; p75: number; min: number; max: number } | null;

const num = (v: unknown): number | null => (typeof v === 'number' && Number.isFinite(v) ? v : null);

/** Median, quartiles (Hyndman & Fan definition 7, as the batch statistics) and range of the finite values. */
export function spreadOf(values: readonly (number | null)[]): Spread {
  const s = values.filter((v): v is number => v != null && Number.isFinite(v)).sort((a, b) => a - b);
  if (!s.length) return null;
  return { median: percentileSorted(s, 0.5), p25: percentileSorted(s, 0.25), p75: percentileSorted(s, 0.75), min: s[0], max: s[s.length - 1] };
}

/** Runs `fn`; a PhysicsError becomes a reason in `reasons` and null. */
function attempt<T>(what: string, reasons: string[], fn: () => T): T | null {
  try {
    return fn();
  } catch (err) {
    if (err instanceof PhysicsError) {
      reasons.push(`${what} could not be computed: ${err.message}.`);
      return null;
    }
    throw err;
  }
}

/** Why a curve has no usable single-diode fit, in words; null when it has one. */
function missingFit(c: BatchPhysicsInput): string | null {
  if (c.status === 'queued' || c.status === 'fitting') return 'Its fit is still waiting or running; the figures come when it is done.';
  if (c.status === 'failed') return `Its fit failed${c.status_reason ? `: ${c.status_reason}` : ''}.`;
  if (!c.fit) return 'It has no single-diode fit.';
  if (!c.fit.result.converged) return `Its single-diode fit did not converge${c.fit.result.message ? `: ${c.fit.result.message}` : ''}.`;
  return null;
}

/** One curve's row: J0 per cell area and the implied Voc at the fit temperature and at 25 °C. */
export function devicePhysics(c: BatchPhysicsInput, defaults: BatchPhysicsDefaults): BatchPhysicsDevice {
  const empty: BatchPhysicsDevice = {
    device_id: c.device_id,
    curve_id: c.curve_id,
    temp_c: null,
    cells: null,
    cell_area_cm2: null,
    n: null,
    isc_a: c.isc_a,
    jsc_a_cm2: null,
    j0_a_cm2: null,
    j0_25c_a_cm2: null,
    measured_voc_v: c.voc_v,
    implied_voc_v: null,
    implied_voc_25c_v: null,
    reason: null,
  };
  const missing = missingFit(c);
  const params = missing ? null : singleDiodeParamsOf(c.fit?.result as FitResult);
  if (!params) return { ...empty, reason: missing ?? 'Its single-diode fit has no parameters.' };
  const cond = c.fit?.conditions ?? {};
  // The conditions the fit used: its I0 belongs to its own cell count and temperature.
  const temp_c = num(cond.temp_c) ?? num(c.meta.temp_c) ?? STC.temp_c;
  const cells = num(cond.cells) ?? num(c.meta.cells) ?? num(defaults.cells) ?? 1;
  const area = num(c.meta.area_cm2) ?? num(defaults.area_cm2);
  const reasons: string[] = [];
  const cell_area_cm2 = area != null ? attempt('The cell area', reasons, () => cellAreaOf(area, cells)) : null;
  if (area == null) reasons.push('Neither its file nor the batch gives a device area, so J0 (a current per area) cannot be given; the implied Voc needs none.');
  const j0 = cell_area_cm2 != null ? attempt('J0', reasons, () => j0FromI0(params.i0_a, cell_area_cm2)) : null;
  const i0_25 = attempt('J0 at 25 °C', reasons, () => i0AtTemperature(params.i0_a, params.n, temp_c, STC.temp_c));
  const jsc = cell_area_cm2 != null ? c.isc_a / cell_area_cm2 : null;
  let implied: number | null = null;
  let implied25: number | null = null;
  if (!(c.isc_a > 0)) reasons.push('Its Isc is not above zero, so there is no implied Voc.');
  else {
    // Jsc/J0 = Isc/I0: the area cancels, so a device without an area still has an implied Voc.
    const ratioTop = jsc ?? c.isc_a;
    const at = (j0Of: number, t: number) => impliedVocFromJ0({ jsc_a_cm2: ratioTop, j0_a_cm2: j0Of, n: params.n, temp_c: t, cells });
    implied = attempt('The implied Voc', reasons, () => at(j0 ?? params.i0_a, temp_c));
    if (i0_25 != null) implied25 = attempt('The implied Voc at 25 °C', reasons, () => at(cell_area_cm2 != null ? i0_25 / cell_area_cm2 : i0_25, STC.temp_c));
  }
  return {
    ...empty,
    temp_c,
    cells,
    cell_area_cm2,
    n: params.n,
    jsc_a_cm2: jsc,
    j0_a_cm2: j0,
    j0_25c_a_cm2: i0_25 != null && cell_area_cm2 != null ? i0_25 / cell_area_cm2 : null,
    implied_voc_v: implied,
    implied_voc_25c_v: implied25,
    reason: reasons.length ? reasons.join(' ') : null,
  };
}

/** The words under the figures: how they were had. */
export const BATCH_PHYSICS_BASIS =
  'J0 = I0 of the current single-diode fit ÷ the area of one cell (device area ÷ cells in series; the file’s area, else the batch’s). ' +
  'Implied Voc = n·Ns·kT/q·ln(Jsc/J0 + 1) with the measured Isc. At 25 °C, J0 is moved from the fit temperature by I0 ∝ n_i(T)^(2/n) ' +
  '(n_i of silicon, Couderc et al. 2014) and Jsc is kept as measured.';

/** The batch's answer: every curve's row (in the order given) and the distributions of J0 and the implied Voc. */
export function batchPhysicsReport(batch: { id: string; name: string } & BatchPhysicsDefaults, curves: readonly BatchPhysicsInput[]) {
  const devices = curves.map((c) => devicePhysics(c, batch));
  return {
    batch: { id: batch.id, name: batch.name, cells: batch.cells, area_cm2: batch.area_cm2 },
    basis: BATCH_PHYSICS_BASIS,
    devices,
    summary: {
      total: devices.length,
      usable: devices.filter((d) => d.implied_voc_v != null).length,
      j0_a_cm2: spreadOf(devices.map((d) => d.j0_a_cm2)),
      j0_25c_a_cm2: spreadOf(devices.map((d) => d.j0_25c_a_cm2)),
      implied_voc_v: spreadOf(devices.map((d) => d.implied_voc_v)),
      implied_voc_25c_v: spreadOf(devices.map((d) => d.implied_voc_25c_v)),
    },
  };
}
export type BatchPhysicsReport = ReturnType<typeof batchPhysicsReport>;
