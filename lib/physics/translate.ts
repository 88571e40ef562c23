/**
 * Translation of I-V curves to other irradiance and temperature.
 *
 * IEC 60891 procedure 1 (absolute coefficients), for each measured point (V1, I1):
 *   I2 = I1 + Isc1·(G2/G1 − 1) + α·(T2 − T1)
 *   V2 = V1 − Rs·(I2 − I1) − κ·I2·(T2 − T1) + β·(T2 − T1)
 * IEC 60891 procedure 2 (relative coefficients, irradiance correction a):
 *   I2 = I1·(1 + α_rel·(T2 − T1))·G2/G1
 *   V2 = V1 + Voc1·(β_rel·(T2 − T1) + a·ln(G2/G1)) − Rs'·(I2 − I1) − κ'·I2·(T2 − T1)
 * Isc1 and Voc1 are the measured curve's own figures (lib/iv key figures) unless given.
 * Every coefficient is an input; a missing one is an error that names it.
 *
 * Model-based translation of a fitted single-diode curve, De Soto, Klein & Beckman (2006),
 * Sol. Energy 80:78–88: n·Ns·Vt ∝ T (n constant), Iph = (G/Gref)·(Iph,ref + α_Isc·(T − Tref)),
 * I0 by their T³·exp(Eg) law (lib/physics/fit-physics, law 'desoto'), Rs constant,
 * Rsh = Rsh,ref·Gref/G. The spectral (air-mass) modifier is taken as 1.
 */
import { PhysicsError, requireFinite, requirePositive } from '@/lib/physics/errors';
import { circuitCurve, circuitFigures, singleDiodeCircuit } from '@/lib/physics/diode';
import type { CircuitFigures } from '@/lib/physics/diode';
import { DEFAULT_ALPHA_ISC_REL_PER_K, i0AtTemperature } from '@/lib/physics/fit-physics';
import type { I0Law } from '@/lib/physics/fit-physics';
import { keyFigures } from '@/lib/iv/key-figures';
import type { CurveMeta, IvCurve, Metrics, SingleDiodeParams } from '@/lib/iv/types';

/** Irradiance (W/m²) and cell temperature (°C) of a measurement or a translation target. */
export type Conditions = { irradiance_w_m2: number; temp_c: number };

/** Plain curve arrays, volts and amperes, generator convention. */
export type CurveArrays = { voltage_v: number[]; current_a: number[] };

/** Irradiance above this is not a plausible plane-of-array value, W/m². */
const MAX_IRRADIANCE_WM2 = 2000;
/** Cell temperatures a translation accepts, °C. */
const TEMP_RANGE_C = { min: -70, max: 150 };

function checkConditions(which: 'from' | 'to', c: Conditions | undefined): Conditions {
  if (!c) throw new PhysicsError(which, `${which} conditions (irradiance_w_m2 and temp_c) are required`);
  requirePositive(`${which}.irradiance_w_m2`, c.irradiance_w_m2);
  if (c.irradiance_w_m2 > MAX_IRRADIANCE_WM2) {
    throw new PhysicsError(`${which}.irradiance_w_m2`, `${which}.irradiance_w_m2 = ${c.irradiance_w_m2} W/m² is above ${MAX_IRRADIANCE_WM2} W/m²`);
  }
  requireFinite(`${which}.temp_c`, c.temp_c);
  if (c.temp_c < TEMP_RANGE_C.min || c.temp_c > TEMP_RANGE_C.max) {
    throw new PhysicsError(
      `${which}.temp_c`,
      `${which}.temp_c = ${c.temp_c} °C is outside ${TEMP_RANGE_C.min} to ${TEMP_RANGE_C.max} °C`,
    );
  }
  return c;
}

function coefficient(name: string, value: number | undefined): number {
  if (value === undefined || value === null) {
    throw new PhysicsError(name, `the translation needs the coefficient ${name}, which is missing`);
  }
  return requireFinite(name, value);
}

function checkArrays(curve: CurveArrays): void {
  if (!curve || !Array.isArray(curve.voltage_v) || !Array.isArray(curve.current_a)) {
    throw new PhysicsError('curve', 'the curve needs voltage_v and current_a arrays');
  }
  if (curve.voltage_v.length !== curve.current_a.length) {
    throw new PhysicsError('curve', `voltage_v has ${curve.voltage_v.length} values but current_a has ${curve.current_a.length}`);
  }
  if (curve.voltage_v.length < 2) throw new PhysicsError('curve', 'the curve needs at least 2 points');
  curve.voltage_v.forEach((v, k) => {
    if (!Number.isFinite(v) || !Number.isFinite(curve.current_a[k])) {
      throw new PhysicsError('curve', `point ${k + 1} of the curve is not a finite number (V=${v}, I=${curve.current_a[k]})`);
    }
  });
}

function asIvCurve(curve: CurveArrays, meta: CurveMeta = {}): IvCurve {
  return { voltage_v: curve.voltage_v, current_a: curve.current_a, meta, notes: [] };
}

function finiteCurve(voltage_v: number[], current_a: number[]): CurveArrays {
  for (let k = 0; k < voltage_v.length; k++) {
    if (!Number.isFinite(voltage_v[k]) || !Number.isFinite(current_a[k])) {
      throw new PhysicsError('curve', `translated point ${k + 1} is not finite; check the coefficients`);
    }
  }
  return { voltage_v, current_a };
}

/** Options of IEC 60891 procedure 1: absolute coefficients. */
export type Iec60891Proc1Options = {
  from: Conditions;
  to: Conditions;
  /** Isc temperature coefficient, A/K. */
  alpha_a_per_k: number;
  /** Voc temperature coefficient, V/K. */
  beta_v_per_k: number;
  /** Internal series resistance, Ω. */
  rs_ohm: number;
  /** Curve correction factor κ, Ω/K. */
  kappa_ohm_per_k: number;
  /** Isc of the measured curve, A; from its key figures when omitted. */
  isc1_a?: number;
};

/** IEC 60891 procedure 1 applied to every point of `curve`; returns the translated arrays and Isc1 used. */
export function translateIec60891Proc1(
  curve: CurveArrays,
  options: Iec60891Proc1Options,
): CurveArrays & { isc1_a: number } {
  checkArrays(curve);
  const from = checkConditions('from', options?.from);
  const to = checkConditions('to', options.to);
  const alpha = coefficient('alpha_a_per_k', options.alpha_a_per_k);
  const beta = coefficient('beta_v_per_k', options.beta_v_per_k);
  const rs = coefficient('rs_ohm', options.rs_ohm);
  const kappa = coefficient('kappa_ohm_per_k', options.kappa_ohm_per_k);
  const isc1 = options.isc1_a !== undefined ? requireFinite('isc1_a', options.isc1_a) : keyFigures(asIvCurve(curve)).metrics.isc_a;
  const dT = to.temp_c - from.temp_c;
  const gRatio = to.irradiance_w_m2 / from.irradiance_w_m2;
  const current_a = curve.current_a.map((i1) => i1 + isc1 * (gRatio - 1) + alpha * dT);
  const voltage_v = curve.voltage_v.map((v1, k) => {
    const i1 = curve.current_a[k];
    const i2 = current_a[k];
    return v1 - rs * (i2 - i1) - kappa * i2 * dT + beta * dT;
  });
  return { ...finiteCurve(voltage_v, current_a), isc1_a: isc1 };
}

/** Options of IEC 60891 procedure 2: relative coefficients and the irradiance correction a. */
export type Iec60891Proc2Options = {
  from: Conditions;
  to: Conditions;
  /** Relative Isc temperature coefficient, 1/K. */
  alpha_rel_per_k: number;
  /** Relative Voc temperature coefficient, 1/K. */
  beta_rel_per_k: number;
  /** Internal series resistance R's, Ω. */
  rs_ohm: number;
  /** Temperature coefficient of the internal series resistance κ', Ω/K. */
  kappa_ohm_per_k: number;
  /** Irradiance correction factor a for Voc (dimensionless). */
  a_irradiance: number;
  /** Voc of the measured curve, V; from its key figures when omitted. */
  voc1_v?: number;
};

/** IEC 60891 procedure 2 applied to every point of `curve`; returns the translated arrays and Voc1 used. */
export function translateIec60891Proc2(
  curve: CurveArrays,
  options: Iec60891Proc2Options,
): CurveArrays & { voc1_v: number } {
  checkArrays(curve);
  const from = checkConditions('from', options?.from);
  const to = checkConditions('to', options.to);
  const alpha = coefficient('alpha_rel_per_k', options.alpha_rel_per_k);
  const beta = coefficient('beta_rel_per_k', options.beta_rel_per_k);
  const rs = coefficient('rs_ohm', options.rs_ohm);
  const kappa = coefficient('kappa_ohm_per_k', options.kappa_ohm_per_k);
  const a = coefficient('a_irradiance', options.a_irradiance);
  const voc1 = options.voc1_v !== undefined ? requireFinite('voc1_v', options.voc1_v) : keyFigures(asIvCurve(curve)).metrics.voc_v;
  const dT = to.temp_c - from.temp_c;
  const gRatio = to.irradiance_w_m2 / from.irradiance_w_m2;
  const current_a = curve.current_a.map((i1) => i1 * (1 + alpha * dT) * gRatio);
  const voltage_v = curve.voltage_v.map((v1, k) => {
    const i1 = curve.current_a[k];
    const i2 = current_a[k];
    return v1 + voc1 * (beta * dT + a * Math.log(gRatio)) - rs * (i2 - i1) - kappa * i2 * dT;
  });
  return { ...finiteCurve(voltage_v, current_a), voc1_v: voc1 };
}

/** Options of the model-based (De Soto) translation. */
export type ModelTranslationOptions = {
  cells: number;
  from: Conditions;
  to: Conditions;
  /** Isc temperature coefficient, A/K; default +0.05 %/K of Iph,ref (common practice). */
  alpha_isc_a_per_k?: number;
  /** Band gap at the reference, eV (De Soto's silicon 1.121 eV by default). */
  eg_ref_ev?: number;
  /** Relative band-gap temperature coefficient, 1/K (De Soto's −0.0002677 by default). */
  deg_dt_ev_per_k?: number;
  /** I0 temperature law; 'desoto' (default) or 'ni-power'. */
  i0_law?: I0Law;
};

/** Translated single-diode parameters plus what was assumed. */
export type ModelTranslation = { params: SingleDiodeParams; notes: string[] };

/** Single-diode parameters moved from `from` to `to` conditions by the De Soto et al. (2006) scaling. */
export function translateModel(params: SingleDiodeParams, options: ModelTranslationOptions): ModelTranslation {
  const from = checkConditions('from', options?.from);
  const to = checkConditions('to', options.to);
  requirePositive('iph_a', params.iph_a);
  requirePositive('rsh_ohm', params.rsh_ohm);
  requireFinite('rs_ohm', params.rs_ohm);
  const notes: string[] = [];
  let alpha = options.alpha_isc_a_per_k;
  if (alpha === undefined) {
    alpha = DEFAULT_ALPHA_ISC_REL_PER_K * params.iph_a;
    notes.push(`alpha_isc_a_per_k not given: used +0.05 %/K of Iph (${alpha.toExponential(3)} A/K, common practice)`);
  }
  requireFinite('alpha_isc_a_per_k', alpha);
  const gRatio = to.irradiance_w_m2 / from.irradiance_w_m2;
  const iph_a = gRatio * (params.iph_a + alpha * (to.temp_c - from.temp_c));
  const i0_a = i0AtTemperature(params.i0_a, params.n, from.temp_c, to.temp_c, {
    law: options.i0_law ?? 'desoto',
    eg_ref_ev: options.eg_ref_ev,
    deg_dt_ev_per_k: options.deg_dt_ev_per_k,
  });
  if (!(iph_a > 0)) throw new PhysicsError('alpha_isc_a_per_k', 'the translated photocurrent is not positive; check alpha_isc_a_per_k');
  notes.push('spectral (air-mass) modifier taken as 1');
  return { params: { iph_a, i0_a, n: params.n, rs_ohm: params.rs_ohm, rsh_ohm: params.rsh_ohm / gRatio }, notes };
}

/** Which translation `translateCurve` applies, with its coefficients. */
export type TranslationRequest =
  | ({ method: 'iec60891-1' } & Iec60891Proc1Options)
  | ({ method: 'iec60891-2' } & Iec60891Proc2Options)
  | ({ method: 'model'; params: SingleDiodeParams; points?: number } & ModelTranslationOptions);

/** A translated curve with its key figures (lib/iv definitions), or why they could not be had. */
export type TranslationResult = {
  method: TranslationRequest['method'];
  from: Conditions;
  to: Conditions;
  curve: IvCurve;
  /** Model-free key figures of the translated curve; null with `figures_error` when unavailable. */
  figures: Metrics | null;
  figures_error?: string;
  /** For the model method: the exact figures of the translated model. */
  model_figures?: CircuitFigures;
  params?: SingleDiodeParams;
  notes: string[];
};

/**
 * Translates a measured curve (IEC 60891 procedure 1 or 2) or a fitted model (De Soto) to the
 * `to` conditions and computes the key figures of the result. `measured` supplies the curve
 * (ignored by the model method except for its meta: cells, area).
 */
export function translateCurve(measured: IvCurve | null, request: TranslationRequest): TranslationResult {
  const meta: CurveMeta = {
    ...(measured?.meta ?? {}),
    irradiance_w_m2: request.to?.irradiance_w_m2,
    temp_c: request.to?.temp_c,
  };
  const notes: string[] = [];
  let arrays: CurveArrays;
  let model_figures: CircuitFigures | undefined;
  let params: SingleDiodeParams | undefined;
  if (request.method === 'iec60891-1') {
    if (!measured) throw new PhysicsError('curve', 'IEC 60891 procedure 1 needs a measured curve');
    const r = translateIec60891Proc1(measured, request);
    arrays = r;
    notes.push(`IEC 60891 procedure 1 with Isc1 = ${r.isc1_a.toPrecision(6)} A`);
  } else if (request.method === 'iec60891-2') {
    if (!measured) throw new PhysicsError('curve', 'IEC 60891 procedure 2 needs a measured curve');
    const r = translateIec60891Proc2(measured, request);
    arrays = r;
    notes.push(`IEC 60891 procedure 2 with Voc1 = ${r.voc1_v.toPrecision(6)} V`);
  } else if (request.method === 'model') {
    const t = translateModel(request.params, request);
    params = t.params;
    notes.push('model translation: De Soto, Klein & Beckman (2006) scaling of the single-diode parameters', ...t.notes);
    const circuit = singleDiodeCircuit(t.params);
    model_figures = circuitFigures(circuit, request.cells, request.to.temp_c);
    arrays = circuitCurve(circuit, request.cells, request.to.temp_c, {
      points: request.points ?? 101,
      v_min_v: 0,
      v_max_v: 1.02 * model_figures.voc_v,
    });
    meta.cells = request.cells;
  } else {
    throw new PhysicsError('method', `method must be iec60891-1, iec60891-2 or model (got ${String((request as { method?: unknown }).method)})`);
  }
  if (request.method !== 'model') arrays = reachZeroVolts(arrays, notes);
  const curve: IvCurve = { voltage_v: arrays.voltage_v, current_a: arrays.current_a, meta, notes };
  let figures: Metrics | null = null;
  let figures_error: string | undefined;
  try {
    figures = keyFigures(curve).metrics;
  } catch (err) {
    figures_error = err instanceof Error ? err.message : String(err);
  }
  return {
    method: request.method,
    from: request.from,
    to: request.to,
    curve,
    figures,
    ...(figures_error !== undefined ? { figures_error } : {}),
    ...(model_figures ? { model_figures } : {}),
    ...(params ? { params } : {}),
    notes,
  };
}

/** Largest gap (as a share of the translated Voc) that `reachZeroVolts` bridges. */
const MAX_ISC_GAP = 0.25;

/**
 * Translating to a colder or brighter condition moves the whole curve to higher voltages, so its
 * first point can land well above 0 V and the translated Isc would be out of the key-figure
 * window. The Isc end of a curve is close to a straight line (slope −1/Rsh), so the first
 * points are extended linearly to 0 V — by a least-squares line through the points within 10 %
 * of Voc of the first one (at least 3) — and the added point is reported in `notes`.
 */
function reachZeroVolts(curve: CurveArrays, notes: string[]): CurveArrays {
  const order = curve.voltage_v.map((_, k) => k).sort((a, b) => curve.voltage_v[a] - curve.voltage_v[b]);
  const v = order.map((k) => curve.voltage_v[k]);
  const i = order.map((k) => curve.current_a[k]);
  if (v[0] <= 0) return { voltage_v: v, current_a: i };
  const crossing = i.findIndex((c) => c <= 0);
  const vocEstimate = crossing > 0 ? v[crossing] : v[v.length - 1];
  if (!(vocEstimate > 0) || v[0] > MAX_ISC_GAP * vocEstimate || v.length < 4) return { voltage_v: v, current_a: i };
  let count = 0;
  while (count < v.length && (count < 3 || v[count] <= v[0] + 0.1 * vocEstimate)) count++;
  let sv = 0;
  let si = 0;
  for (let k = 0; k < count; k++) {
    sv += v[k];
    si += i[k];
  }
  const mv = sv / count;
  const mi = si / count;
  let sxy = 0;
  let sxx = 0;
  for (let k = 0; k < count; k++) {
    sxy += (v[k] - mv) * (i[k] - mi);
    sxx += (v[k] - mv) ** 2;
  }
  const slope = sxx > 0 ? sxy / sxx : 0;
  const i0 = mi - slope * mv;
  notes.push(
    `the translated curve starts at ${v[0].toPrecision(4)} V: extended linearly to 0 V through its first ${count} points (Isc ${i0.toPrecision(6)} A)`,
  );
  return { voltage_v: [0, ...v], current_a: [i0, ...i] };
}
