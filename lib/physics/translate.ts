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
export type Conditions = { irradiance_Wm2: number; tempC: number };

/** Plain curve arrays, volts and amperes, generator convention. */
export type CurveArrays = { voltage_V: number[]; current_A: number[] };

/** Irradiance above this is not a plausible plane-of-array value, W/m². */
const MAX_IRRADIANCE_WM2 = 2000;
/** Cell temperatures a translation accepts, °C. */
const TEMP_RANGE_C = { min: -70, max: 150 };

function checkConditions(which: 'from' | 'to', c: Conditions | undefined): Conditions {
  if (!c) throw new PhysicsError(which, `${which} conditions (irradiance_Wm2 and tempC) are required`);
  requirePositive(`${which}.irradiance_Wm2`, c.irradiance_Wm2);
  if (c.irradiance_Wm2 > MAX_IRRADIANCE_WM2) {
    throw new PhysicsError(`${which}.irradiance_Wm2`, `${which}.irradiance_Wm2 = ${c.irradiance_Wm2} W/m² is above ${MAX_IRRADIANCE_WM2} W/m²`);
  }
  requireFinite(`${which}.tempC`, c.tempC);
  if (c.tempC < TEMP_RANGE_C.min || c.tempC > TEMP_RANGE_C.max) {
    throw new PhysicsError(
      `${which}.tempC`,
      `${which}.tempC = ${c.tempC} °C is outside ${TEMP_RANGE_C.min} to ${TEMP_RANGE_C.max} °C`,
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
  if (!curve || !Array.isArray(curve.voltage_V) || !Array.isArray(curve.current_A)) {
    throw new PhysicsError('curve', 'the curve needs voltage_V and current_A arrays');
  }
  if (curve.voltage_V.length !== curve.current_A.length) {
    throw new PhysicsError('curve', `voltage_V has ${curve.voltage_V.length} values but current_A has ${curve.current_A.length}`);
  }
  if (curve.voltage_V.length < 2) throw new PhysicsError('curve', 'the curve needs at least 2 points');
  curve.voltage_V.forEach((v, k) => {
    if (!Number.isFinite(v) || !Number.isFinite(curve.current_A[k])) {
      throw new PhysicsError('curve', `point ${k + 1} of the curve is not a finite number (V=${v}, I=${curve.current_A[k]})`);
    }
  });
}

function asIvCurve(curve: CurveArrays, meta: CurveMeta = {}): IvCurve {
  return { voltage_V: curve.voltage_V, current_A: curve.current_A, meta, notes: [] };
}

function finiteCurve(voltage_V: number[], current_A: number[]): CurveArrays {
  for (let k = 0; k < voltage_V.length; k++) {
    if (!Number.isFinite(voltage_V[k]) || !Number.isFinite(current_A[k])) {
      throw new PhysicsError('curve', `translated point ${k + 1} is not finite; check the coefficients`);
    }
  }
  return { voltage_V, current_A };
}

/** Options of IEC 60891 procedure 1: absolute coefficients. */
export type Iec60891Proc1Options = {
  from: Conditions;
  to: Conditions;
  /** Isc temperature coefficient, A/K. */
  alpha_A_per_K: number;
  /** Voc temperature coefficient, V/K. */
  beta_V_per_K: number;
  /** Internal series resistance, Ω. */
  rs_ohm: number;
  /** Curve correction factor κ, Ω/K. */
  kappa_ohm_per_K: number;
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
  const alpha = coefficient('alpha_A_per_K', options.alpha_A_per_K);
  const beta = coefficient('beta_V_per_K', options.beta_V_per_K);
  const rs = coefficient('rs_ohm', options.rs_ohm);
  const kappa = coefficient('kappa_ohm_per_K', options.kappa_ohm_per_K);
  const isc1 = options.isc1_a !== undefined ? requireFinite('isc1_a', options.isc1_a) : keyFigures(asIvCurve(curve)).metrics.isc_a;
  const dT = to.tempC - from.tempC;
  const gRatio = to.irradiance_Wm2 / from.irradiance_Wm2;
  const current_A = curve.current_A.map((i1) => i1 + isc1 * (gRatio - 1) + alpha * dT);
  const voltage_V = curve.voltage_V.map((v1, k) => {
    const i1 = curve.current_A[k];
    const i2 = current_A[k];
    return v1 - rs * (i2 - i1) - kappa * i2 * dT + beta * dT;
  });
  return { ...finiteCurve(voltage_V, current_A), isc1_a: isc1 };
}

/** Options of IEC 60891 procedure 2: relative coefficients and the irradiance correction a. */
export type Iec60891Proc2Options = {
  from: Conditions;
  to: Conditions;
  /** Relative Isc temperature coefficient, 1/K. */
  alpha_rel_per_K: number;
  /** Relative Voc temperature coefficient, 1/K. */
  beta_rel_per_K: number;
  /** Internal series resistance R's, Ω. */
  rs_ohm: number;
  /** Temperature coefficient of the internal series resistance κ', Ω/K. */
  kappa_ohm_per_K: number;
  /** Irradiance correction factor a for Voc (dimensionless). */
  a_irradiance: number;
  /** Voc of the measured curve, V; from its key figures when omitted. */
  voc1_V?: number;
};

/** IEC 60891 procedure 2 applied to every point of `curve`; returns the translated arrays and Voc1 used. */
export function translateIec60891Proc2(
  curve: CurveArrays,
  options: Iec60891Proc2Options,
): CurveArrays & { voc1_V: number } {
  checkArrays(curve);
  const from = checkConditions('from', options?.from);
  const to = checkConditions('to', options.to);
  const alpha = coefficient('alpha_rel_per_K', options.alpha_rel_per_K);
  const beta = coefficient('beta_rel_per_K', options.beta_rel_per_K);
  const rs = coefficient('rs_ohm', options.rs_ohm);
  const kappa = coefficient('kappa_ohm_per_K', options.kappa_ohm_per_K);
  const a = coefficient('a_irradiance', options.a_irradiance);
  const voc1 = options.voc1_V !== undefined ? requireFinite('voc1_V', options.voc1_V) : keyFigures(asIvCurve(curve)).metrics.voc_v;
  const dT = to.tempC - from.tempC;
  const gRatio = to.irradiance_Wm2 / from.irradiance_Wm2;
  const current_A = curve.current_A.map((i1) => i1 * (1 + alpha * dT) * gRatio);
  const voltage_V = curve.voltage_V.map((v1, k) => {
    const i1 = curve.current_A[k];
    const i2 = current_A[k];
    return v1 + voc1 * (beta * dT + a * Math.log(gRatio)) - rs * (i2 - i1) - kappa * i2 * dT;
  });
  return { ...finiteCurve(voltage_V, current_A), voc1_V: voc1 };
}

/** Options of the model-based (De Soto) translation. */
export type ModelTranslationOptions = {
  cells: number;
  from: Conditions;
  to: Conditions;
  /** Isc temperature coefficient, A/K; default +0.05 %/K of Iph,ref (common practice). */
  alpha_isc_A_per_K?: number;
  /** Band gap at the reference, eV (De Soto's silicon 1.121 eV by default). */
  egRef_eV?: number;
  /** Relative band-gap temperature coefficient, 1/K (De Soto's −0.0002677 by default). */
  dEgdT_per_K?: number;
  /** I0 temperature law; 'desoto' (default) or 'ni-power'. */
  i0Law?: I0Law;
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
  let alpha = options.alpha_isc_A_per_K;
  if (alpha === undefined) {
    alpha = DEFAULT_ALPHA_ISC_REL_PER_K * params.iph_a;
    notes.push(`alpha_isc_A_per_K not given: used +0.05 %/K of Iph (${alpha.toExponential(3)} A/K, common practice)`);
  }
  requireFinite('alpha_isc_A_per_K', alpha);
  const gRatio = to.irradiance_Wm2 / from.irradiance_Wm2;
  const iph_a = gRatio * (params.iph_a + alpha * (to.tempC - from.tempC));
  const i0_a = i0AtTemperature(params.i0_a, params.n, from.tempC, to.tempC, {
    law: options.i0Law ?? 'desoto',
    egRef_eV: options.egRef_eV,
    dEgdT_per_K: options.dEgdT_per_K,
  });
  if (!(iph_a > 0)) throw new PhysicsError('alpha_isc_A_per_K', 'the translated photocurrent is not positive; check alpha_isc_A_per_K');
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
  /** Model-free key figures of the translated curve; null with `figuresError` when unavailable. */
  figures: Metrics | null;
  figuresError?: string;
  /** For the model method: the exact figures of the translated model. */
  modelFigures?: CircuitFigures;
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
    irradiance_Wm2: request.to?.irradiance_Wm2,
    tempC: request.to?.tempC,
  };
  const notes: string[] = [];
  let arrays: CurveArrays;
  let modelFigures: CircuitFigures | undefined;
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
    notes.push(`IEC 60891 procedure 2 with Voc1 = ${r.voc1_V.toPrecision(6)} V`);
  } else if (request.method === 'model') {
    const t = translateModel(request.params, request);
    params = t.params;
    notes.push('model translation: De Soto, Klein & Beckman (2006) scaling of the single-diode parameters', ...t.notes);
    const circuit = singleDiodeCircuit(t.params);
    modelFigures = circuitFigures(circuit, request.cells, request.to.tempC);
    arrays = circuitCurve(circuit, request.cells, request.to.tempC, {
      points: request.points ?? 101,
      vMin_V: 0,
      vMax_V: 1.02 * modelFigures.voc_v,
    });
    meta.cells = request.cells;
  } else {
    throw new PhysicsError('method', `method must be iec60891-1, iec60891-2 or model (got ${String((request as { method?: unknown }).method)})`);
  }
  if (request.method !== 'model') arrays = reachZeroVolts(arrays, notes);
  const curve: IvCurve = { voltage_V: arrays.voltage_V, current_A: arrays.current_A, meta, notes };
  let figures: Metrics | null = null;
  let figuresError: string | undefined;
  try {
    figures = keyFigures(curve).metrics;
  } catch (err) {
    figuresError = err instanceof Error ? err.message : String(err);
  }
  return {
    method: request.method,
    from: request.from,
    to: request.to,
    curve,
    figures,
    ...(figuresError !== undefined ? { figuresError } : {}),
    ...(modelFigures ? { modelFigures } : {}),
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
  const order = curve.voltage_V.map((_, k) => k).sort((a, b) => curve.voltage_V[a] - curve.voltage_V[b]);
  const v = order.map((k) => curve.voltage_V[k]);
  const i = order.map((k) => curve.current_A[k]);
  if (v[0] <= 0) return { voltage_V: v, current_A: i };
  const crossing = i.findIndex((c) => c <= 0);
  const vocEstimate = crossing > 0 ? v[crossing] : v[v.length - 1];
  if (!(vocEstimate > 0) || v[0] > MAX_ISC_GAP * vocEstimate || v.length < 4) return { voltage_V: v, current_A: i };
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
  return { voltage_V: [0, ...v], current_A: [i0, ...i] };
}
