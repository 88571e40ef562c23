/**
 * The physics answers, assembled from the engines (pure: stored values in, JSON-ready objects
 * out): a material at a temperature, a band diagram with both statistics, the physics of a
 * curve's current fits, and a curve translated to other conditions. server/services/physics.ts
 * loads the curve and its fits and sends these.
 */
import { doubleDiodeParamsOf, singleDiodeParamsOf } from '@/lib/iv';
import type { DoubleDiodeParams, FitResult, IvCurve, Metrics, SingleDiodeParams } from '@/lib/iv';
import { STC, ZERO_C_IN_K } from '@/lib/physics/constants';
import {
  bandDiagram,
  cellAreaOf,
  impliedVocFromJ0,
  j0FromI0,
  materialAt,
  num,
  occupationCurve,
  PhysicsError,
  predictVocVsTemperature,
  quasiFermiLevels,
  recombinationSharesAtMpp,
  SILICON,
  translateCurve,
  vocTempCoefficient,
} from '@/lib/physics';
import type { TranslationRequest } from '@/lib/physics';
import type { BandDiagramRequest, TranslateRequest } from '@/lib/schemas/physics';

/**
 * The n_i value the screen shows beside the model's: Altermatt et al. (2003), J. Appl. Phys.
 * 93:1598, silicon at 300 K. The library's model (Couderc et al. 2014) is fitted to agree with it.
 */
export const NI_REFERENCE = { temp_k: 300, ni_cm3: 9.65e9, source: 'Altermatt et al. 2003, J. Appl. Phys. 93:1598' } as const;

/** About this many points on a chart's temperature axis. */
const SERIES_POINTS = 40;

/** A step of 1, 2 or 5 × 10ⁿ that cuts `span` into about SERIES_POINTS pieces. */
function niceStep(span: number): number {
  const raw = span / SERIES_POINTS;
  const e = 10 ** Math.floor(Math.log10(raw));
  return [1, 2, 5, 10].map((m) => m * e).find((s) => s >= raw) ?? 10 * e;
}

/** Throws a PhysicsError at `input` unless the chart range [from, to] (in `unit`, °C offset `offset_k`) lies in the model's temperatures. */
function checkRange(input: { from: string; to: string }, from: number, to: number, unit: 'K' | '°C') {
  const offset = unit === 'K' ? 0 : ZERO_C_IN_K;
  const lo = SILICON.temp_range_k.min - offset;
  const hi = SILICON.temp_range_k.max - offset;
  if (!(to > from)) throw new PhysicsError(input.to, `${input.to} must be above ${input.from} (got ${num(to)} ${unit} ≤ ${num(from)} ${unit})`);
  for (const [name, v] of [[input.from, from], [input.to, to]] as const) {
    if (v < lo || v > hi) throw new PhysicsError(name, `${name} = ${num(v)} ${unit} is outside the ${SILICON.name} model's range ${num(lo)}…${num(hi)} ${unit}`);
  }
}
/** Most points a translated curve is sent with. */
const MAX_CURVE_POINTS = 200;

/** The first value in `x` that is a number but not finite, with where it is (`result.single.j0`), or null. */
export function firstNonFinite(x: unknown, where = 'result'): { where: string; value: number } | null {
  if (typeof x === 'number') return Number.isFinite(x) ? null : { where, value: x };
  if (Array.isArray(x)) {
    for (let k = 0; k < x.length; k++) {
      const bad = firstNonFinite(x[k], `${where}[${k}]`);
      if (bad) return bad;
    }
  } else if (x && typeof x === 'object') {
    for (const [k, v] of Object.entries(x)) {
      const bad = firstNonFinite(v, `${where}.${k}`);
      if (bad) return bad;
    }
  }
  return null;
}

/** Evenly spaced indices, first and last kept, at most `max` points. */
export function thinCurve(c: { voltage_v: number[]; current_a: number[] }, max = MAX_CURVE_POINTS): { voltage_v: number[]; current_a: number[] } {
  const n = c.voltage_v.length;
  if (n <= max) return { voltage_v: [...c.voltage_v], current_a: [...c.current_a] };
  const idx = Array.from({ length: max }, (_, k) => Math.round((k * (n - 1)) / (max - 1)));
  return { voltage_v: idx.map((k) => c.voltage_v[k]), current_a: idx.map((k) => c.current_a[k]) };
}

/** The single-diode parameters of a converged fit, or null. */
export const singleOf = (f: FitResult | undefined): SingleDiodeParams | null => singleDiodeParamsOf(f);

/** The double-diode parameters of a converged fit, or null. */
export const doubleOf = (f: FitResult | undefined): DoubleDiodeParams | null => doubleDiodeParamsOf(f);

/** Runs `fn`; a PhysicsError becomes a note and null, so one section's failure does not sink the rest. */
function attempt<T>(what: string, notes: string[], fn: () => T): T | null {
  try {
    return fn();
  } catch (err) {
    if (err instanceof PhysicsError) {
      notes.push(`${what} could not be computed: ${err.message}`);
      return null;
    }
    throw err;
  }
}

/**
 * n_i, Eg, Nc, Nv of silicon at temp_k (keys as `ni --json`), the Altermatt et al. (2003)
 * reference, and n_i from `range.from_k` to `range.to_k` (200–400 K unless given) for the chart.
 */
export function materialReport(temp_k: number, range: { from_k: number; to_k: number } = { from_k: 200, to_k: 400 }) {
  const s = materialAt(temp_k);
  checkRange({ from: 'from_k', to: 'to_k' }, range.from_k, range.to_k, 'K');
  const step = niceStep(range.to_k - range.from_k);
  const series: { temp_k: number[]; ni_cm3: number[] } = { temp_k: [], ni_cm3: [] };
  for (let k = 0; range.from_k + k * step <= range.to_k + 1e-9; k++) {
    const t = Number((range.from_k + k * step).toPrecision(12));
    series.temp_k.push(t);
    series.ni_cm3.push(materialAt(t).ni_cm3);
  }
  if (series.temp_k[series.temp_k.length - 1] < range.to_k) {
    series.temp_k.push(range.to_k);
    series.ni_cm3.push(materialAt(range.to_k).ni_cm3);
  }
  return {
    temp_k,
    temp_c: temp_k - ZERO_C_IN_K,
    ni_cm3: s.ni_cm3,
    eg_ev: s.eg_ev,
    nc_cm3: s.nc_cm3,
    nv_cm3: s.nv_cm3,
    eg_dos_ev: s.eg_dos_ev,
    kt_ev: s.kt_ev,
    material: { id: SILICON.id, name: SILICON.name, temp_range_k: SILICON.temp_range_k, max_doping_cm3: SILICON.max_doping_cm3, sources: SILICON.sources },
    reference: { ...NI_REFERENCE, model_at_reference_cm3: materialAt(NI_REFERENCE.temp_k).ni_cm3 },
    series,
  };
}

/** The band-diagram answer: the Fermi–Dirac result, the Boltzmann one beside it, occupation curves. */
export function bandDiagramReport(input: BandDiagramRequest) {
  const q = quasiFermiLevels(input);
  const d = bandDiagram(input);
  const occupation = occupationCurve(d, { points: 121 });
  return {
    input: { type: input.type, doping_cm3: input.doping_cm3, excess_cm3: q.excess_cm3, temp_k: input.temp_k },
    material: { name: SILICON.name, eg_ev: q.material.eg_ev, eg_dos_ev: q.material.eg_dos_ev, ni_cm3: q.material.ni_cm3, kt_ev: q.material.kt_ev },
    diagram: d,
    fermi_dirac: {
      ef_ev: q.ef_ev,
      efn_ev: q.efn_ev,
      efp_ev: q.efp_ev,
      n0_cm3: q.n0_cm3,
      p0_cm3: q.p0_cm3,
      n_cm3: q.n_cm3,
      p_cm3: q.p_cm3,
      eta_n: q.eta_n,
      eta_p: q.eta_p,
      splitting_ev: q.splitting_ev,
      implied_voc_v: q.implied_voc_v,
    },
    boltzmann: {
      ef_ev: q.boltzmann.ef_ev,
      efn_ev: q.boltzmann.efn_ev,
      efp_ev: q.boltzmann.efp_ev,
      n0_cm3: q.boltzmann.n0_cm3,
      p0_cm3: q.boltzmann.p0_cm3,
      splitting_ev: q.boltzmann.splitting_ev,
      implied_voc_v: q.boltzmann.implied_voc_v,
    },
    /** Boltzmann minus Fermi–Dirac. */
    difference: { splitting_ev: q.boltzmann.splitting_ev - q.splitting_ev, implied_voc_v: q.boltzmann.implied_voc_v - q.implied_voc_v },
    degenerate: q.degenerate,
    occupation,
  };
}

/** A stored curve as the reports read it. */
export type StoredCurve = {
  id: string;
  deviceId: string;
  meta: IvCurve['meta'];
  metrics: Metrics;
  stc: unknown;
  voltage_v: number[];
  current_a: number[];
};

/** A curve's current fits: their results and the conditions they were made at. */
export type CurrentFits = {
  single?: { result: FitResult; conditions: Record<string, unknown> };
  double?: { result: FitResult; conditions: Record<string, unknown> };
};

/** Cell temperature, cells in series and irradiance a curve's fits used (fit conditions, then metadata). */
export function curveConditions(c: Pick<StoredCurve, 'meta'>, fit: { conditions: Record<string, unknown> } | undefined) {
  const num = (v: unknown) => (typeof v === 'number' && Number.isFinite(v) ? v : null);
  const temp_c = num(fit?.conditions.temp_c) ?? num(c.meta.temp_c) ?? 25;
  const cells = num(fit?.conditions.cells) ?? num(c.meta.cells) ?? 1;
  const irradiance = num(fit?.conditions.irradiance_w_m2) ?? num(c.meta.irradiance_w_m2);
  return { temp_c, cells, irradiance_w_m2: irradiance, area_cm2: num(c.meta.area_cm2) };
}

/**
 * The physics of a curve's current fits: J0 per cell area, Voc predicted over −40…+85 °C, the Voc
 * temperature coefficient (two I0 laws), the implied Voc from Jsc and J0, the double-diode
 * recombination shares at MPP, and the stored STC figures. What cannot be computed is a note.
 */
export function curvePhysicsReport(c: StoredCurve, fits: CurrentFits, batch: { id: string; name: string } | null, range: { from_c: number; to_c: number } = { from_c: -40, to_c: 85 }) {
  checkRange({ from: 'from_c', to: 'to_c' }, range.from_c, range.to_c, '°C');
  const cond = curveConditions(c, fits.single ?? fits.double);
  const notes: string[] = [];
  const cell_area_cm2 = cond.area_cm2 != null ? attempt('The cell area', notes, () => cellAreaOf(cond.area_cm2 as number, cond.cells)) : null;
  if (cond.area_cm2 == null) notes.push('The curve has no device area, so J0 (a current per area) cannot be given; refit it with the area to see J0.');

  const sp = singleOf(fits.single?.result);
  if (!fits.single) notes.push('The curve has no single-diode fit.');
  else if (!sp) notes.push(`The single-diode fit did not converge${fits.single.result.message ? `: ${fits.single.result.message}` : ''}.`);
  const single = sp
    ? (() => {
        const j0 = cell_area_cm2 != null ? attempt('J0', notes, () => j0FromI0(sp.i0_a, cell_area_cm2)) : null;
        const isc = c.metrics.isc_a;
        const implied_voc_v =
          isc > 0
            ? attempt('The implied Voc', notes, () =>
                // Jsc/J0 = Isc/I0: the area cancels, so the implied Voc needs no area.
                impliedVocFromJ0({ jsc_a_cm2: cell_area_cm2 ? isc / cell_area_cm2 : isc, j0_a_cm2: j0 ?? sp.i0_a, n: sp.n, temp_c: cond.temp_c, cells: cond.cells }),
              )
            : null;
        const opts = { cells: cond.cells, temp_c: cond.temp_c };
        const coefficient = attempt('The Voc temperature coefficient', notes, () => vocTempCoefficient(sp, opts));
        const coefficient_de_soto = attempt('The Voc temperature coefficient (De Soto law)', notes, () => vocTempCoefficient(sp, { ...opts, law: 'desoto' }));
        const series = attempt('Voc across temperature', notes, () =>
          predictVocVsTemperature(sp, { cells: cond.cells, fit_temp_c: cond.temp_c, from_c: range.from_c, to_c: range.to_c, step_c: niceStep(range.to_c - range.from_c) }),
        );
        return {
          params: sp,
          j0_a_cm2: j0,
          implied_voc: implied_voc_v == null ? null : { voc_v: implied_voc_v, jsc_a_cm2: cell_area_cm2 ? isc / cell_area_cm2 : null, isc_a: isc, measured_voc_v: c.metrics.voc_v },
          coefficient,
          coefficient_de_soto,
          voc_vs_temperature: series ? { law: series.law, points: series.points.map((p) => ({ temp_c: p.temp_c, voc_v: p.voc_v })) } : null,
        };
      })()
    : null;

  const dp = doubleOf(fits.double?.result);
  if (fits.double && !dp) notes.push('The double-diode fit did not converge.');
  const double = dp
    ? {
        params: dp,
        j01_a_cm2: cell_area_cm2 != null ? attempt('J01', notes, () => j0FromI0(dp.i01_a, cell_area_cm2)) : null,
        j02_a_cm2: cell_area_cm2 != null ? attempt('J02', notes, () => j0FromI0(dp.i02_a, cell_area_cm2)) : null,
        shares: attempt('The recombination shares at MPP', notes, () => recombinationSharesAtMpp(dp, { cells: cond.cells, temp_c: cond.temp_c })),
      }
    : null;

  return {
    curve: { id: c.id, device_id: c.deviceId, batch, meta: c.meta, metrics: c.metrics },
    conditions: { ...cond, cell_area_cm2 },
    stc: c.stc,
    single,
    double,
    notes,
  };
}

/**
 * A stored curve moved to the target conditions by the chosen method: its key figures beside
 * the measured ones and the translated curve (≤ 200 points); `no_fit` when the model
 * translation has no converged single-diode fit to use.
 */
export function translationReport(c: StoredCurve, fits: CurrentFits, body: TranslateRequest): { ok: true; report: ReturnType<typeof assembleTranslation> } | { ok: false; reason: 'no_fit' } {
  const cond = curveConditions(c, fits.single);
  const notes: string[] = [];
  const from = { irradiance_w_m2: cond.irradiance_w_m2 ?? STC.irradiance_w_m2, temp_c: cond.temp_c };
  if (cond.irradiance_w_m2 == null) notes.push('The curve gives no irradiance: it was taken as measured at 1000 W/m².');
  const measured: IvCurve = { voltage_v: c.voltage_v, current_a: c.current_a, meta: c.meta, notes: [] };
  let request: TranslationRequest;
  if (body.method === 'model') {
    const sp = singleOf(fits.single?.result);
    if (!sp) return { ok: false, reason: 'no_fit' };
    request = { method: 'model', params: sp, cells: cond.cells, from, to: body.to, alpha_isc_a_per_k: body.alpha_isc_a_per_k, i0_law: body.i0_law, points: 121 };
  } else if (body.method === 'iec60891-1') {
    request = {
      method: 'iec60891-1',
      from,
      to: body.to,
      alpha_a_per_k: body.alpha_a_per_k as number,
      beta_v_per_k: body.beta_v_per_k as number,
      rs_ohm: body.rs_ohm as number,
      kappa_ohm_per_k: body.kappa_ohm_per_k as number,
      isc1_a: c.metrics.isc_a,
    };
  } else {
    request = {
      method: 'iec60891-2',
      from,
      to: body.to,
      alpha_rel_per_k: body.alpha_rel_per_k as number,
      beta_rel_per_k: body.beta_rel_per_k as number,
      rs_ohm: body.rs_ohm as number,
      kappa_ohm_per_k: body.kappa_ohm_per_k as number,
      a_irradiance: body.a_irradiance as number,
      voc1_v: c.metrics.voc_v,
    };
  }
  return { ok: true, report: assembleTranslation(c, measured, from, cond.area_cm2, translateCurve(measured, request), notes) };
}

function assembleTranslation(c: StoredCurve, measured: IvCurve, from: { irradiance_w_m2: number; temp_c: number }, area_cm2: number | null, t: ReturnType<typeof translateCurve>, notes: string[]) {
  const area_m2 = area_cm2 != null ? area_cm2 * 1e-4 : null;
  const best = t.model_figures
    ? { isc_a: t.model_figures.isc_a, voc_v: t.model_figures.voc_v, pmp_w: t.model_figures.pmp_w, imp_a: t.model_figures.imp_a, vmp_v: t.model_figures.vmp_v, ff: t.model_figures.ff }
    : t.figures
      ? { isc_a: t.figures.isc_a, voc_v: t.figures.voc_v, pmp_w: t.figures.pmp_w, imp_a: t.figures.imp_a, vmp_v: t.figures.vmp_v, ff: t.figures.ff }
      : null;
  return {
    method: t.method,
    from,
    to: t.to,
    figures: best ? { ...best, efficiency: area_m2 ? best.pmp_w / (t.to.irradiance_w_m2 * area_m2) : null } : null,
    figures_source: t.model_figures ? 'model' : best ? 'curve' : null,
    figures_error: t.figures_error ?? null,
    measured: { conditions: from, figures: c.metrics, curve: thinCurve(measured) },
    params: t.params ?? null,
    curve: thinCurve(t.curve),
    points_total: t.curve.voltage_v.length,
    notes: [...notes, ...t.notes],
  };
}
