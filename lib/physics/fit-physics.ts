/**
 * From a fitted equivalent circuit to the semiconductor: J0, the temperature law of the
 * saturation current, Voc at other temperatures and its temperature coefficient, the implied
 * Voc from Jsc and J0, and for a double-diode fit the share of each recombination path.
 *
 * Temperature laws for I0 (choose with `law`):
 * - 'ni-power' (default): I0(T) ∝ n_i(T)^(2/n) with n_i of the material model. For n = 1
 *   this is the ideal diffusion diode (J0 = q·n_i²·Σ D/(L·N)), for n = 2 depletion-region
 *   recombination (I02 ∝ n_i); a fitted n in between interpolates. The weak temperature
 *   dependence of D, L and the lifetimes is neglected.
 * - 'desoto': De Soto, Klein & Beckman (2006), Sol. Energy 80:78 —
 *   I0(T) = I0,ref·(T/Tref)³·exp[(1/k_B)·(Eg,ref/Tref − Eg(T)/T)] with
 *   Eg(T) = Eg,ref·(1 + deg_dt_ev_per_k·(T − Tref)), Eg,ref = 1.121 eV and dEgdT = −0.0002677 /K
 *   for silicon (their values, memory). Its exponent has no 1/n, so for n > 1 it predicts a
 *   steeper Voc(T) than the n_i law.
 * Iph(T) = Iph·(1 + alpha_isc_rel_per_k·(T − Tfit)); the default α = +0.05 %/K is the common
 * crystalline-silicon figure (common practice). n, Rs and Rsh are held at their fitted values.
 */
import { KB_EV_PER_K, ZERO_C_IN_K, thermal_voltage_v } from '@/lib/physics/constants';
import { num, PhysicsError, requireFinite, requirePositive } from '@/lib/physics/errors';
import { circuitBranchCurrents, circuitFigures, circuitVoc, doubleDiodeCircuit, singleDiodeCircuit } from '@/lib/physics/diode';
import { checkTempK, materialAt, SILICON } from '@/lib/physics/materials';
import type { MaterialModel } from '@/lib/physics/materials';
import type { DoubleDiodeParams, SingleDiodeParams } from '@/lib/iv/types';

/** Default relative Isc temperature coefficient, 1/K (+0.05 %/K, common practice for c-Si). */
export const DEFAULT_ALPHA_ISC_REL_PER_K = 0.0005;
/** De Soto et al. (2006) silicon band gap at reference conditions, eV (memory). */
export const DESOTO_EG_REF_EV = 1.121;
/** De Soto et al. (2006) relative band-gap temperature coefficient for silicon, 1/K (memory). */
export const DESOTO_DEGDT_PER_K = -0.0002677;

export type I0Law = 'ni-power' | 'desoto';

/** Options of the I0 temperature law. */
export type I0LawOptions = {
  law?: I0Law;
  material?: MaterialModel;
  eg_ref_ev?: number;
  deg_dt_ev_per_k?: number;
};

function tempKOf(input: string, temp_c: number, material: MaterialModel): number {
  requireFinite(input, temp_c);
  const temp_k = temp_c + ZERO_C_IN_K;
  const { min, max } = material.temp_range_k;
  if (temp_k < min || temp_k > max) {
    const c = (k: number) => Math.round((k - ZERO_C_IN_K) * 100) / 100;
    throw new PhysicsError(
      input,
      `${input} = ${temp_c} °C is outside the ${material.name} model's range ${c(min)} to ${c(max)} °C`,
    );
  }
  return checkTempK(temp_k, material, input);
}

/**
 * Saturation current density J0 = I0/A, A/cm². `cell_area_cm2` is the area of ONE cell: in a
 * series string every cell carries the same current, so a module fit's I0 (with the exponent
 * scaled by n·cells·Vt) is already the per-cell value. Use `cellAreaOf` for a module's area.
 */
export function j0FromI0(i0_a: number, cell_area_cm2: number): number {
  requirePositive('i0_a', i0_a);
  requirePositive('cell_area_cm2', cell_area_cm2);
  return i0_a / cell_area_cm2;
}

/** Area of one cell, cm², from a device's total area and its number of series cells. */
export function cellAreaOf(area_cm2: number, cells: number): number {
  requirePositive('area_cm2', area_cm2);
  if (!Number.isInteger(cells) || cells < 1) throw new PhysicsError('cells', `cells must be a whole number ≥ 1 (got ${cells})`);
  return area_cm2 / cells;
}

/** I0 scaled from fit_temp_c to temp_c (°C) by the chosen law (see the file header), A. */
export function i0AtTemperature(
  i0_a: number,
  n: number,
  fit_temp_c: number,
  temp_c: number,
  options: I0LawOptions = {},
): number {
  requirePositive('i0_a', i0_a);
  requirePositive('n', n);
  const material = options.material ?? SILICON;
  const t1 = tempKOf('fit_temp_c', fit_temp_c, material);
  const t2 = tempKOf('temp_c', temp_c, material);
  const law = options.law ?? 'ni-power';
  let lnRatio: number;
  if (law === 'ni-power') {
    lnRatio = (2 / n) * (Math.log(materialAt(t2, material).ni_cm3) - Math.log(materialAt(t1, material).ni_cm3));
  } else if (law === 'desoto') {
    const egRef = requirePositive('eg_ref_ev', options.eg_ref_ev ?? DESOTO_EG_REF_EV);
    const slope = requireFinite('deg_dt_ev_per_k', options.deg_dt_ev_per_k ?? DESOTO_DEGDT_PER_K);
    // The reference is the fit temperature; Eg(T) is anchored there.
    const eg2 = egRef * (1 + slope * (t2 - t1));
    lnRatio = 3 * Math.log(t2 / t1) + (egRef / t1 - eg2 / t2) / KB_EV_PER_K;
  } else {
    throw new PhysicsError('law', `law must be "ni-power" or "desoto" (got ${String(law)})`);
  }
  const out = i0_a * Math.exp(lnRatio);
  if (!Number.isFinite(out) || out <= 0) throw new PhysicsError('temp_c', `I0 at ${temp_c} °C is out of numeric range`);
  return out;
}

/** Options shared by the Voc predictions. */
export type VocPredictionOptions = I0LawOptions & {
  cells: number;
  /** Temperature the parameters were fitted at, °C. */
  fit_temp_c: number;
  /** Relative Isc temperature coefficient, 1/K (default +0.0005, common practice). */
  alpha_isc_rel_per_k?: number;
};

/** The single-diode parameters moved from fit_temp_c to temp_c: I0 by the law, Iph by α. */
export function paramsAtTemperature(
  params: SingleDiodeParams,
  temp_c: number,
  options: VocPredictionOptions,
): SingleDiodeParams {
  const alpha = requireFinite('alpha_isc_rel_per_k', options.alpha_isc_rel_per_k ?? DEFAULT_ALPHA_ISC_REL_PER_K);
  const i0_a = i0AtTemperature(params.i0_a, params.n, options.fit_temp_c, temp_c, options);
  const iph_a = params.iph_a * (1 + alpha * (temp_c - options.fit_temp_c));
  return { ...params, i0_a, iph_a };
}

/** Predicted open-circuit voltage, V, of a fitted single-diode device at temp_c (°C). */
export function predictVoc(params: SingleDiodeParams, temp_c: number, options: VocPredictionOptions): number {
  const p = paramsAtTemperature(params, temp_c, options);
  return circuitVoc(singleDiodeCircuit(p), options.cells, temp_c);
}

export type VocTemperaturePoint = { temp_c: number; voc_v: number; i0_a: number; iph_a: number };

/**
 * Voc across temperature for a chart: from from_c to to_c (°C, defaults −20 and 80) in steps of
 * step_c (default 5 K), each point from the temperature law applied to the fitted parameters.
 */
export function predictVocVsTemperature(
  params: SingleDiodeParams,
  options: VocPredictionOptions & { from_c?: number; to_c?: number; step_c?: number },
): { points: VocTemperaturePoint[]; law: I0Law } {
  const from_c = requireFinite('from_c', options.from_c ?? -20);
  const to_c = requireFinite('to_c', options.to_c ?? 80);
  const step_c = requirePositive('step_c', options.step_c ?? 5);
  if (!(to_c >= from_c)) throw new PhysicsError('to_c', `to_c must not be below from_c (got ${num(to_c)} °C < ${num(from_c)} °C)`);
  if ((to_c - from_c) / step_c > 1000) throw new PhysicsError('step_c', 'step_c is too small: more than 1000 points requested');
  const material = options.material ?? SILICON;
  tempKOf('from_c', from_c, material);
  tempKOf('to_c', to_c, material);
  const points: VocTemperaturePoint[] = [];
  for (let k = 0; from_c + k * step_c <= to_c + 1e-9; k++) {
    const temp_c = from_c + k * step_c;
    const p = paramsAtTemperature(params, temp_c, options);
    points.push({ temp_c, voc_v: circuitVoc(singleDiodeCircuit(p), options.cells, temp_c), i0_a: p.i0_a, iph_a: p.iph_a });
  }
  return { points, law: options.law ?? 'ni-power' };
}

/** Voc temperature coefficient of a fitted device at the temperature it was fitted at. */
export type VocTempCoefficient = {
  voc_v: number;
  beta_v_per_k: number;
  /** β relative to Voc at temp_c, %/K. */
  beta_pct_per_k: number;
  /** β per cell, V/K. */
  beta_per_cell_v_per_k: number;
  law: I0Law;
  alpha_isc_rel_per_k: number;
};

/**
 * dVoc/dT of a fitted single-diode device at temp_c (the fit temperature), by a central
 * difference of `predictVoc` over ±0.5 K. Law 'ni-power' by default (see the file header).
 */
export function vocTempCoefficient(
  params: SingleDiodeParams,
  options: Omit<VocPredictionOptions, 'fit_temp_c'> & { temp_c: number },
): VocTempCoefficient {
  const opts: VocPredictionOptions = { ...options, fit_temp_c: options.temp_c };
  const h = 0.5;
  const voc_v = predictVoc(params, options.temp_c, opts);
  const up = predictVoc(params, options.temp_c + h, opts);
  const down = predictVoc(params, options.temp_c - h, opts);
  const beta_v_per_k = (up - down) / (2 * h);
  if (!(voc_v > 0)) throw new PhysicsError('iph_a', 'the parameters give no positive open-circuit voltage');
  return {
    voc_v,
    beta_v_per_k,
    beta_pct_per_k: (100 * beta_v_per_k) / voc_v,
    beta_per_cell_v_per_k: beta_v_per_k / options.cells,
    law: options.law ?? 'ni-power',
    alpha_isc_rel_per_k: options.alpha_isc_rel_per_k ?? DEFAULT_ALPHA_ISC_REL_PER_K,
  };
}

/** Implied Voc, V, from Jsc and J0: (n·cells·k_BT/q)·ln(Jsc/J0 + 1). Densities in A/cm². */
export function impliedVocFromJ0(input: {
  jsc_a_cm2: number;
  j0_a_cm2: number;
  n?: number;
  temp_c: number;
  cells?: number;
}): number {
  requirePositive('jsc_a_cm2', input.jsc_a_cm2);
  requirePositive('j0_a_cm2', input.j0_a_cm2);
  const n = requirePositive('n', input.n ?? 1);
  const cells = input.cells ?? 1;
  if (!Number.isInteger(cells) || cells < 1) throw new PhysicsError('cells', `cells must be a whole number ≥ 1 (got ${cells})`);
  const temp_k = requireFinite('temp_c', input.temp_c) + ZERO_C_IN_K;
  if (temp_k <= 0) throw new PhysicsError('temp_c', `temp_c must be above absolute zero (got ${input.temp_c} °C)`);
  return n * cells * thermal_voltage_v(input.temp_c) * Math.log1p(input.jsc_a_cm2 / input.j0_a_cm2);
}

/** Where the current goes at the maximum power point of a double-diode device. */
export type RecombinationShares = {
  vmp_v: number;
  imp_a: number;
  /** Current of diode 1 (diffusion, n1 ≈ 1), A. */
  diode1_a: number;
  /** Current of diode 2 (depletion-region recombination, n2 ≈ 2), A. */
  diode2_a: number;
  shunt_a: number;
  /** diode2/(diode1 + diode2): the depletion-region share of the diode recombination. */
  depletion_share: number;
  /** diode1/(diode1 + diode2). */
  diffusion_share: number;
};

/**
 * Recombination in the depletion region (diode 2) versus diffusion (diode 1) at the maximum
 * power point of a double-diode fit; temp_c in °C, n1 and n2 per cell.
 */
export function recombinationSharesAtMpp(
  params: DoubleDiodeParams,
  options: { cells: number; temp_c: number },
): RecombinationShares {
  const c = doubleDiodeCircuit(params);
  const mpp = circuitFigures(c, options.cells, options.temp_c);
  const b = circuitBranchCurrents(c, mpp.vmp_v, options.cells, options.temp_c);
  const [d1, d2] = b.diodes_a;
  const sum = d1 + d2;
  if (!(sum > 0)) throw new PhysicsError('i01_a', 'the diodes carry no current at the maximum power point');
  return {
    vmp_v: mpp.vmp_v,
    imp_a: mpp.imp_a,
    diode1_a: d1,
    diode2_a: d2,
    shunt_a: b.shunt_a,
    depletion_share: d2 / sum,
    diffusion_share: d1 / sum,
  };
}
