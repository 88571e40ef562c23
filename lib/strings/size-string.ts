/**
 * How many modules fit in series: the string's open-circuit voltage is highest at the site's
 * coldest first light (cells at ambient, Voc rising as the cells cool), and its MPP voltage
 * lowest with the hottest cells. Results are design guidance; see HV_CAUTION.
 *
 *   Voc,max(module) = Voc,STC · (1 + β_Voc·(T_min − 25 °C)),  β in %/K divided by 100
 *   max modules     = ⌊V_sys / Voc,max(module)⌋
 *   Vmp,min(module) = Vmp,STC · (1 + β_Vmp·(T_cell,max − 25 °C))
 *   min modules     = ⌈V_mpp,min / Vmp,min(module)⌉
 */
import { STC } from '@/lib/physics/constants';
import { ELV_LIMIT_V } from '@/lib/strings/cautions';
import { StringSizingError } from '@/lib/strings/errors';

/** Temperatures accepted for a site or a cell, °C: outside this a value is almost surely a typo. */
export const TEMP_RANGE_C = { min: -60, max: 100 } as const;

export type StringSizingInput = {
  /** Open-circuit voltage of one module at STC, V (use the batch's highest, see worstModule). */
  voc_stc_v: number;
  /** Relative Voc temperature coefficient, %/K (negative for silicon, ≈ −0.3 %/K). */
  beta_voc_pct_per_k: number;
  /** Site's record low ambient temperature, °C (cells sit at ambient at first light). */
  t_min_c: number;
  /** Highest expected cell temperature, °C (needed for the least modules). */
  t_cell_max_c?: number;
  /** Maximum system voltage: the lower of the modules' and the inverter's rating, V DC. */
  v_sys_v: number;
  /** MPP voltage of one module at STC, V. */
  vmp_stc_v?: number;
  /** Relative Vmp temperature coefficient, %/K. */
  beta_vmp_pct_per_k?: number;
  /** Inverter MPP-tracking window, bottom, V (give both ends or neither). */
  mpp_window_min_v?: number;
  /** Inverter MPP-tracking window, top, V. */
  mpp_window_max_v?: number;
};

export type StringSizingResult = {
  /** One module's Voc at T_min, V. */
  voc_max_per_module_v: number;
  /** Most modules in series whose cold Voc stays at or below v_sys_v. */
  max_modules: number;
  /** max_modules · voc_max_per_module_v, V. */
  string_voc_max_v: number;
  /** v_sys_v − string_voc_max_v, V. */
  margin_v: number;
  /** margin_v as % of v_sys_v. */
  margin_pct: number;
  /** Least modules whose hot Vmp stays at or above the MPP window's minimum. */
  min_modules?: number;
  /** One module's Vmp at t_cell_max_c, V. */
  vmp_min_per_module_v?: number;
  /** One module's Vmp at t_min_c, V. */
  vmp_max_per_module_v?: number;
  /** Most modules whose cold Vmp stays within the MPP window's maximum. */
  max_modules_mpp?: number;
  /** False when no string length satisfies both the voltage limit and the MPP window. */
  fits: boolean;
  /** True when the string's cold Voc is above the extra-low-voltage limit. */
  above_elv: boolean;
  warnings: string[];
};

function required(name: string, v: unknown, what: string): number {
  if (v === undefined || v === null || (typeof v === 'string' && v.trim() === '')) {
    throw new StringSizingError(`${name} is missing: enter ${what}`);
  }
  if (typeof v !== 'number' || !Number.isFinite(v)) {
    const shown = typeof v === 'number' ? String(v) : (JSON.stringify(v) ?? String(v));
    throw new StringSizingError(`${name} is ${shown}, not a number: enter ${what}`);
  }
  return v;
}

function temperature(name: string, v: unknown, what: string): number {
  const t = required(name, v, what);
  if (t < TEMP_RANGE_C.min || t > TEMP_RANGE_C.max) {
    throw new StringSizingError(
      `${name} is ${t} °C, outside ${TEMP_RANGE_C.min}…+${TEMP_RANGE_C.max} °C: check the value and its unit (°C, not °F or K)`,
    );
  }
  return t;
}

/** The factor 1 + β/100·(T − 25 °C); throws when the coefficient would make the voltage ≤ 0. */
function tempFactor(name: string, beta_pct_per_k: number, temp_c: number): number {
  const f = 1 + (beta_pct_per_k / 100) * (temp_c - STC.temp_c);
  if (!(f > 0)) {
    throw new StringSizingError(
      `${name} = ${beta_pct_per_k} %/K at ${temp_c} °C gives a voltage ≤ 0: the coefficient must be in %/K (silicon ≈ −0.3 %/K)`,
    );
  }
  return f;
}

/** Floors a ratio that should be an integer but may sit a rounding error below it. */
const floorRatio = (x: number): number => Math.floor(x * (1 + 1e-12));
const ceilRatio = (x: number): number => Math.ceil(x * (1 - 1e-12));

/**
 * Sizes a series string from one module's STC voltages and temperature coefficients (%/K),
 * the site's record low (°C) and the system voltage limit (V). Throws StringSizingError on
 * missing or impossible input; warns on suspicious coefficients.
 */
export function sizeString(input: StringSizingInput): StringSizingResult {
  if (!input || typeof input !== 'object') throw new StringSizingError('string sizing needs an input object');
  const warnings: string[] = [];
  const vocStc = required('voc_stc_v', input.voc_stc_v, "the module's open-circuit voltage at STC in V");
  if (vocStc <= 0) throw new StringSizingError(`voc_stc_v is ${vocStc} V: an open-circuit voltage must be above 0 V`);
  const beta = required('beta_voc_pct_per_k', input.beta_voc_pct_per_k, 'the Voc temperature coefficient in %/K (silicon ≈ −0.3 %/K)');
  const tMin = temperature('t_min_c', input.t_min_c, "the site's record low temperature in °C");
  const vSys = required('v_sys_v', input.v_sys_v, 'the maximum system voltage in V DC (e.g. 1000 or 1500)');
  if (vSys <= 0) throw new StringSizingError(`v_sys_v is ${vSys} V: the system voltage limit must be above 0 V`);
  const tCellMax =
    input.t_cell_max_c === undefined || input.t_cell_max_c === null
      ? undefined
      : temperature('t_cell_max_c', input.t_cell_max_c, 'the highest cell temperature in °C');
  if (tCellMax !== undefined && tCellMax < tMin) {
    throw new StringSizingError(`t_cell_max_c (${tCellMax} °C) is below t_min_c (${tMin} °C): the two look swapped`);
  }

  if (beta > 0) {
    warnings.push(
      `The Voc coefficient is positive (${beta} %/K). Crystalline silicon's Voc falls with temperature (≈ −0.3 %/K, common practice); ` +
        'with a positive sign the cold-weather voltage is underestimated and too many modules are allowed. Check the sign.',
    );
  } else if (beta === 0) {
    warnings.push('The Voc coefficient is 0 %/K: every real module gains voltage in the cold, so the string voltage is underestimated.');
  } else if (beta < -1) {
    warnings.push(`The Voc coefficient ${beta} %/K is unusually large in magnitude (silicon ≈ −0.3 %/K): check it is in %/K, not mV/K.`);
  }
  if (tMin > STC.temp_c) {
    warnings.push(`t_min_c is ${tMin} °C, above 25 °C: check that it is the site's record low, not an average.`);
  }
  if (vSys > 1500) warnings.push(`v_sys_v is ${vSys} V, above the 1500 V DC that PV equipment is usually rated for.`);

  const vocMax = vocStc * tempFactor('beta_voc_pct_per_k', beta, tMin);
  if (vocMax > vSys) {
    throw new StringSizingError(
      `The system voltage limit (${vSys} V) is below one module's cold-weather Voc (${round3(vocMax)} V at ${tMin} °C): ` +
        'not even one module fits. Check the limit and the module data.',
    );
  }
  const maxModules = floorRatio(vSys / vocMax);
  const stringVoc = maxModules * vocMax;
  let margin = vSys - stringVoc;
  if (Math.abs(margin) < 1e-9 * vSys) margin = 0;

  const result: StringSizingResult = {
    voc_max_per_module_v: vocMax,
    max_modules: maxModules,
    string_voc_max_v: stringVoc,
    margin_v: margin,
    margin_pct: (100 * margin) / vSys,
    fits: true,
    above_elv: stringVoc > ELV_LIMIT_V,
    warnings,
  };

  const wantsMpp = input.mpp_window_min_v != null || input.mpp_window_max_v != null;
  const hasVmp = input.vmp_stc_v !== undefined && input.vmp_stc_v !== null;
  if (wantsMpp || hasVmp) {
    const need = wantsMpp ? 'the least modules for the MPP window need' : 'vmp_stc_v needs';
    const vmpStc = required('vmp_stc_v', input.vmp_stc_v, `the module's MPP voltage at STC in V (${need} it)`);
    if (vmpStc <= 0 || vmpStc >= vocStc) {
      throw new StringSizingError(`vmp_stc_v is ${vmpStc} V: it must lie between 0 V and voc_stc_v (${vocStc} V)`);
    }
    const betaVmp = required(
      'beta_vmp_pct_per_k',
      input.beta_vmp_pct_per_k,
      `the Vmp temperature coefficient in %/K, silicon ≈ −0.4 %/K (${need} it)`,
    );
    if (betaVmp > 0) {
      warnings.push(`The Vmp coefficient is positive (${betaVmp} %/K); silicon's Vmp falls with temperature. Check the sign.`);
    }
    const vmpMax = vmpStc * tempFactor('beta_vmp_pct_per_k', betaVmp, tMin);
    result.vmp_max_per_module_v = vmpMax;
    if (tCellMax === undefined) {
      if (wantsMpp) throw new StringSizingError('t_cell_max_c is missing: enter the highest cell temperature in °C (the least modules for the MPP window need it)');
    } else {
      result.vmp_min_per_module_v = vmpStc * tempFactor('beta_vmp_pct_per_k', betaVmp, tCellMax);
    }
    if (wantsMpp) {
      const lo = required('mpp_window_min_v', input.mpp_window_min_v, "the inverter's lowest MPP voltage in V");
      const hi = required('mpp_window_max_v', input.mpp_window_max_v, "the inverter's highest MPP voltage in V");
      if (lo <= 0 || hi <= lo) {
        throw new StringSizingError(`MPP window ${lo}–${hi} V is not a window: need 0 < mpp_window_min_v < mpp_window_max_v`);
      }
      if (hi > vSys) warnings.push(`The MPP window's maximum (${hi} V) is above the system voltage limit (${vSys} V).`);
      const minModules = Math.max(1, ceilRatio(lo / result.vmp_min_per_module_v!));
      result.min_modules = minModules;
      result.max_modules_mpp = floorRatio(hi / vmpMax);
      if (minModules > maxModules) {
        result.fits = false;
        warnings.push(
          `No string length fits: the MPP window needs at least ${minModules} modules when hot, ` +
            `but the voltage limit allows at most ${maxModules} when cold.`,
        );
      } else if (result.max_modules_mpp < maxModules) {
        warnings.push(
          `Strings longer than ${result.max_modules_mpp} modules put the cold MPP voltage above the window's maximum (${hi} V); ` +
            'the inverter then limits power on cold sunny days.',
        );
      }
    }
  }
  return result;
}

function round3(x: number): number {
  return Math.round(x * 1000) / 1000;
}

export type ModuleVoc = { device_id: string; voc_v: number | null | undefined };

export type WorstModule = {
  device_id: string;
  /** Highest Voc in the batch, V (at the conditions the caller supplied, normally STC). */
  voc_v: number;
  /** Position in the input list. */
  index: number;
  /** Modules with a Voc. */
  count: number;
  mean_voc_v: number;
  /** One sentence saying which module the sizing is based on and why. */
  note: string;
};

/**
 * The batch's highest-Voc module (pass STC Voc values): strings are sized on the worst case,
 * not the mean, because every module in a string could be as high as the highest one measured.
 */
export function worstModule(modules: readonly ModuleVoc[]): WorstModule {
  if (!Array.isArray(modules)) throw new StringSizingError('worstModule needs an array of { device_id, voc_v }');
  let best = -1;
  let sum = 0;
  let count = 0;
  modules.forEach((m, i) => {
    const v = m?.voc_v;
    if (v === undefined || v === null) return;
    if (typeof v !== 'number' || !Number.isFinite(v) || v <= 0) {
      throw new StringSizingError(`module ${i} ("${m.device_id}"): voc_v is ${String(v)}, not a positive number of volts`);
    }
    sum += v;
    count += 1;
    if (best < 0 || v > (modules[best].voc_v as number)) best = i;
  });
  if (best < 0) throw new StringSizingError('no module in the batch has a Voc: measure or fit the curves first');
  const top = modules[best];
  const mean = sum / count;
  const voc = top.voc_v as number;
  return {
    device_id: top.device_id,
    voc_v: voc,
    index: best,
    count,
    mean_voc_v: mean,
    note:
      `Sized on the highest-Voc module of ${count} (${top.device_id}, ${round3(voc)} V), not the batch mean ` +
      `(${round3(mean)} V), so that no module in the string exceeds the voltage used here.`,
  };
}

export type VocTempPoint = { temp_c: number; voc_v: number };

export type MeasuredBeta = {
  /** Relative coefficient (dVoc/dT)/Voc(25 °C)·100, %/K. */
  beta_voc_pct_per_k: number;
  /** Least-squares slope dVoc/dT, V/K. */
  slope_v_per_k: number;
  /** Fitted Voc at 25 °C, V. */
  voc_at_25_v: number;
  /** Coefficient of determination of the straight line. */
  r2: number;
  points: number;
  span_k: number;
  warnings: string[];
};

/**
 * The Voc temperature coefficient measured across temperatures: a least-squares straight
 * line Voc(T) through curves of one device (or one batch's means) at several temperatures,
 * referred to the fitted Voc at 25 °C.
 */
export function betaVocFromMeasurements(points: readonly VocTempPoint[]): MeasuredBeta {
  if (!Array.isArray(points) || points.length < 2) {
    throw new StringSizingError('the Voc coefficient needs curves at two or more temperatures');
  }
  points.forEach((p, i) => {
    if (!Number.isFinite(p?.temp_c) || p.temp_c < TEMP_RANGE_C.min || p.temp_c > TEMP_RANGE_C.max) {
      throw new StringSizingError(`points[${i}].temp_c is ${String(p?.temp_c)}: need a cell temperature within −60…+100 °C`);
    }
    if (!Number.isFinite(p.voc_v) || p.voc_v <= 0) {
      throw new StringSizingError(`points[${i}].voc_v is ${String(p.voc_v)}: need a positive voltage`);
    }
  });
  const n = points.length;
  const tm = points.reduce((s, p) => s + p.temp_c, 0) / n;
  const vm = points.reduce((s, p) => s + p.voc_v, 0) / n;
  let stt = 0;
  let stv = 0;
  let svv = 0;
  for (const p of points) {
    stt += (p.temp_c - tm) ** 2;
    stv += (p.temp_c - tm) * (p.voc_v - vm);
    svv += (p.voc_v - vm) ** 2;
  }
  const span = Math.max(...points.map((p) => p.temp_c)) - Math.min(...points.map((p) => p.temp_c));
  if (!(stt > 0)) throw new StringSizingError('all curves are at the same temperature: no coefficient can be measured');
  const slope = stv / stt;
  const voc25 = vm + slope * (STC.temp_c - tm);
  const warnings: string[] = [];
  if (span < 10) warnings.push(`The temperatures span only ${round3(span)} K: the coefficient is uncertain (aim for 20 K or more).`);
  const r2 = svv > 0 ? (stv * stv) / (stt * svv) : 1;
  const beta = (100 * slope) / voc25;
  if (beta > 0) warnings.push(`The measured Voc rises with temperature (${round3(beta)} %/K): check the temperature records.`);
  return { beta_voc_pct_per_k: beta, slope_v_per_k: slope, voc_at_25_v: voc25, r2, points: n, span_k: span, warnings };
}
