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
 *   Eg(T) = Eg,ref·(1 + dEgdT_per_K·(T − Tref)), Eg,ref = 1.121 eV and dEgdT = −0.0002677 /K
 *   for silicon (their values, memory). Its exponent has no 1/n, so for n > 1 it predicts a
 *   steeper Voc(T) than the n_i law.
 * Iph(T) = Iph·(1 + alphaIsc_rel_per_K·(T − Tfit)); the default α = +0.05 %/K is the common
 * crystalline-silicon figure (common practice). n, Rs and Rsh are held at their fitted values.
 */
import { KB_EV_PER_K, ZERO_C_IN_K, thermalVoltage_V } from '@/lib/physics/constants';
import { PhysicsError, requireFinite, requirePositive } from '@/lib/physics/errors';
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
  egRef_eV?: number;
  dEgdT_per_K?: number;
};

function tempKOf(input: string, tempC: number, material: MaterialModel): number {
  requireFinite(input, tempC);
  const tempK = tempC + ZERO_C_IN_K;
  const { min, max } = material.tempRangeK;
  if (tempK < min || tempK > max) {
    const c = (k: number) => Math.round((k - ZERO_C_IN_K) * 100) / 100;
    throw new PhysicsError(
      input,
      `${input} = ${tempC} °C is outside the ${material.name} model's range ${c(min)} to ${c(max)} °C`,
    );
  }
  return checkTempK(tempK, material, input);
}

/**
 * Saturation current density J0 = I0/A, A/cm². `cellArea_cm2` is the area of ONE cell: in a
 * series string every cell carries the same current, so a module fit's I0 (with the exponent
 * scaled by n·cells·Vt) is already the per-cell value. Use `cellAreaOf` for a module's area.
 */
export function j0FromI0(i0_a: number, cellArea_cm2: number): number {
  requirePositive('i0_a', i0_a);
  requirePositive('cellArea_cm2', cellArea_cm2);
  return i0_a / cellArea_cm2;
}

/** Area of one cell, cm², from a device's total area and its number of series cells. */
export function cellAreaOf(area_cm2: number, cells: number): number {
  requirePositive('area_cm2', area_cm2);
  if (!Number.isInteger(cells) || cells < 1) throw new PhysicsError('cells', `cells must be a whole number ≥ 1 (got ${cells})`);
  return area_cm2 / cells;
}

/** I0 scaled from fitTempC to tempC (°C) by the chosen law (see the file header), A. */
export function i0AtTemperature(
  i0_a: number,
  n: number,
  fitTempC: number,
  tempC: number,
  options: I0LawOptions = {},
): number {
  requirePositive('i0_a', i0_a);
  requirePositive('n', n);
  const material = options.material ?? SILICON;
  const t1 = tempKOf('fitTempC', fitTempC, material);
  const t2 = tempKOf('tempC', tempC, material);
  const law = options.law ?? 'ni-power';
  let lnRatio: number;
  if (law === 'ni-power') {
    lnRatio = (2 / n) * (Math.log(materialAt(t2, material).ni_cm3) - Math.log(materialAt(t1, material).ni_cm3));
  } else if (law === 'desoto') {
    const egRef = requirePositive('egRef_eV', options.egRef_eV ?? DESOTO_EG_REF_EV);
    const slope = requireFinite('dEgdT_per_K', options.dEgdT_per_K ?? DESOTO_DEGDT_PER_K);
    // The reference is the fit temperature; Eg(T) is anchored there.
    const eg2 = egRef * (1 + slope * (t2 - t1));
    lnRatio = 3 * Math.log(t2 / t1) + (egRef / t1 - eg2 / t2) / KB_EV_PER_K;
  } else {
    throw new PhysicsError('law', `law must be "ni-power" or "desoto" (got ${String(law)})`);
  }
  const out = i0_a * Math.exp(lnRatio);
  if (!Number.isFinite(out) || out <= 0) throw new PhysicsError('tempC', `I0 at ${tempC} °C is out of numeric range`);
  return out;
}

/** Options shared by the Voc predictions. */
export type VocPredictionOptions = I0LawOptions & {
  cells: number;
  /** Temperature the parameters were fitted at, °C. */
  fitTempC: number;
  /** Relative Isc temperature coefficient, 1/K (default +0.0005, common practice). */
  alphaIsc_rel_per_K?: number;
};

/** The single-diode parameters moved from fitTempC to tempC: I0 by the law, Iph by α. */
export function paramsAtTemperature(
  params: SingleDiodeParams,
  tempC: number,
  options: VocPredictionOptions,
): SingleDiodeParams {
  const alpha = requireFinite('alphaIsc_rel_per_K', options.alphaIsc_rel_per_K ?? DEFAULT_ALPHA_ISC_REL_PER_K);
  const i0_a = i0AtTemperature(params.i0_a, params.n, options.fitTempC, tempC, options);
  const iph_a = params.iph_a * (1 + alpha * (tempC - options.fitTempC));
  return { ...params, i0_a, iph_a };
}

/** Predicted open-circuit voltage, V, of a fitted single-diode device at tempC (°C). */
export function predictVoc(params: SingleDiodeParams, tempC: number, options: VocPredictionOptions): number {
  const p = paramsAtTemperature(params, tempC, options);
  return circuitVoc(singleDiodeCircuit(p), options.cells, tempC);
}

export type VocTemperaturePoint = { tempC: number; voc_V: number; i0_a: number; iph_a: number };

/**
 * Voc across temperature for a chart: from fromC to toC (°C, defaults −20 and 80) in steps of
 * stepC (default 5 K), each point from the temperature law applied to the fitted parameters.
 */
export function predictVocVsTemperature(
  params: SingleDiodeParams,
  options: VocPredictionOptions & { fromC?: number; toC?: number; stepC?: number },
): { points: VocTemperaturePoint[]; law: I0Law } {
  const fromC = requireFinite('fromC', options.fromC ?? -20);
  const toC = requireFinite('toC', options.toC ?? 80);
  const stepC = requirePositive('stepC', options.stepC ?? 5);
  if (!(toC >= fromC)) throw new PhysicsError('toC', `toC must not be below fromC (got ${toC} < ${fromC})`);
  if ((toC - fromC) / stepC > 1000) throw new PhysicsError('stepC', 'stepC is too small: more than 1000 points requested');
  const material = options.material ?? SILICON;
  tempKOf('fromC', fromC, material);
  tempKOf('toC', toC, material);
  const points: VocTemperaturePoint[] = [];
  for (let k = 0; fromC + k * stepC <= toC + 1e-9; k++) {
    const tempC = fromC + k * stepC;
    const p = paramsAtTemperature(params, tempC, options);
    points.push({ tempC, voc_V: circuitVoc(singleDiodeCircuit(p), options.cells, tempC), i0_a: p.i0_a, iph_a: p.iph_a });
  }
  return { points, law: options.law ?? 'ni-power' };
}

/** Voc temperature coefficient of a fitted device at the temperature it was fitted at. */
export type VocTempCoefficient = {
  voc_V: number;
  beta_V_per_K: number;
  /** β relative to Voc at tempC, %/K. */
  beta_pct_per_K: number;
  /** β per cell, V/K. */
  betaPerCell_V_per_K: number;
  law: I0Law;
  alphaIsc_rel_per_K: number;
};

/**
 * dVoc/dT of a fitted single-diode device at tempC (the fit temperature), by a central
 * difference of `predictVoc` over ±0.5 K. Law 'ni-power' by default (see the file header).
 */
export function vocTempCoefficient(
  params: SingleDiodeParams,
  options: Omit<VocPredictionOptions, 'fitTempC'> & { tempC: number },
): VocTempCoefficient {
  const opts: VocPredictionOptions = { ...options, fitTempC: options.tempC };
  const h = 0.5;
  const voc_V = predictVoc(params, options.tempC, opts);
  const up = predictVoc(params, options.tempC + h, opts);
  const down = predictVoc(params, options.tempC - h, opts);
  const beta_V_per_K = (up - down) / (2 * h);
  if (!(voc_V > 0)) throw new PhysicsError('iph_a', 'the parameters give no positive open-circuit voltage');
  return {
    voc_V,
    beta_V_per_K,
    beta_pct_per_K: (100 * beta_V_per_K) / voc_V,
    betaPerCell_V_per_K: beta_V_per_K / options.cells,
    law: options.law ?? 'ni-power',
    alphaIsc_rel_per_K: options.alphaIsc_rel_per_K ?? DEFAULT_ALPHA_ISC_REL_PER_K,
  };
}

/** Implied Voc, V, from Jsc and J0: (n·cells·k_BT/q)·ln(Jsc/J0 + 1). Densities in A/cm². */
export function impliedVocFromJ0(input: {
  jsc_A_per_cm2: number;
  j0_A_per_cm2: number;
  n?: number;
  tempC: number;
  cells?: number;
}): number {
  requirePositive('jsc_A_per_cm2', input.jsc_A_per_cm2);
  requirePositive('j0_A_per_cm2', input.j0_A_per_cm2);
  const n = requirePositive('n', input.n ?? 1);
  const cells = input.cells ?? 1;
  if (!Number.isInteger(cells) || cells < 1) throw new PhysicsError('cells', `cells must be a whole number ≥ 1 (got ${cells})`);
  const tempK = requireFinite('tempC', input.tempC) + ZERO_C_IN_K;
  if (tempK <= 0) throw new PhysicsError('tempC', `tempC must be above absolute zero (got ${input.tempC} °C)`);
  return n * cells * thermalVoltage_V(input.tempC) * Math.log1p(input.jsc_A_per_cm2 / input.j0_A_per_cm2);
}

/** Where the current goes at the maximum power point of a double-diode device. */
export type RecombinationShares = {
  vmp_V: number;
  imp_a: number;
  /** Current of diode 1 (diffusion, n1 ≈ 1), A. */
  diode1_a: number;
  /** Current of diode 2 (depletion-region recombination, n2 ≈ 2), A. */
  diode2_a: number;
  shunt_a: number;
  /** diode2/(diode1 + diode2): the depletion-region share of the diode recombination. */
  depletionShare: number;
  /** diode1/(diode1 + diode2). */
  diffusionShare: number;
};

/**
 * Recombination in the depletion region (diode 2) versus diffusion (diode 1) at the maximum
 * power point of a double-diode fit; tempC in °C, n1 and n2 per cell.
 */
export function recombinationSharesAtMpp(
  params: DoubleDiodeParams,
  options: { cells: number; tempC: number },
): RecombinationShares {
  const c = doubleDiodeCircuit(params);
  const mpp = circuitFigures(c, options.cells, options.tempC);
  const b = circuitBranchCurrents(c, mpp.vmp_v, options.cells, options.tempC);
  const [d1, d2] = b.diodes_A;
  const sum = d1 + d2;
  if (!(sum > 0)) throw new PhysicsError('i01_a', 'the diodes carry no current at the maximum power point');
  return {
    vmp_V: mpp.vmp_v,
    imp_a: mpp.imp_a,
    diode1_a: d1,
    diode2_a: d2,
    shunt_a: b.shunt_A,
    depletionShare: d2 / sum,
    diffusionShare: d1 / sum,
  };
}
