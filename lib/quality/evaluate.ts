/**
 * Pass/fail of devices and batches against an acceptance spec: every reason a device fails,
 * its power class, robust outlier marks and the batch's statistics with Cpk.
 */
import { insideGuardBand, limitReasons, limitsFor, resolvePowerClasses, ruleOf, type DecisionRule } from '@/lib/quality/decision-rules';
import { describe, type Description } from '@/lib/quality/describe';
import { QualityError } from '@/lib/quality/errors';
import { formatValue, isParamKey, PARAM_KEYS, type ParamKey } from '@/lib/quality/params';
import { belowLowestReason, flagReason, nameplateText, noClassReason, noPowerReason, notMeasuredReason } from '@/lib/quality/reason-text';
import { robustZ } from '@/lib/quality/robust-z';
import type { PowerClasses, Spec } from '@/lib/quality/spec';
import { labelOf } from '@/lib/vocabulary';

/** One measured device as the engine and database hand it over. */
export type DeviceRecord = {
  device_id: string;
  values: Partial<Record<ParamKey, number | null>>;
  /** Flag codes raised on the device's curve or fit. */
  flags: string[];
  /** Why a value is absent, in words, where no method could give it (Pmax at STC: lib/analysis/stc.ts). */
  absent?: Partial<Record<ParamKey, string>>;
  /** Expanded uncertainty (k = 2) of figures, in their units (lib/quality/uncertainty.ts). */
  uncertainty?: Partial<Record<ParamKey, number>>;
  /** The nameplate power the spec's nameplate-relative limits and classes use (the device's, else the batch's). */
  nameplate_w?: number | null;
};

export type FailReason = {
  kind: 'below_min' | 'above_max' | 'inside_guard_band' | 'no_nameplate' | 'not_measured' | 'not_measurable' | 'flag' | 'power_class';
  /** The parameter, or 'flags' for a flag. */
  param: ParamKey | 'flags';
  /** The measured value, the flag code, or null when not measured. */
  value: number | string | null;
  /** Which limit was broken; null for not measured, flags and power classes. */
  limit: 'min' | 'max' | null;
  bound: number | null;
  message: string;
};

export type DeviceEvaluation = {
  device_id: string;
  result: 'pass' | 'fail';
  /** Every failed rule, in spec order (limits in parameter order, then power class, then flags). */
  reasons: FailReason[];
  power_class: string | null;
  /** A judged value lies within its expanded uncertainty of a limit (lib/quality/decision-rules.ts). */
  in_guard_band: boolean;
};

/** Reads a device value: null when absent; throws on NaN/±Infinity (never valid JSON, so a bug upstream). */
function valueOf(device: DeviceRecord, key: ParamKey): number | null {
  const v = device.values?.[key];
  if (v === undefined || v === null) return null;
  if (typeof v !== 'number' || !Number.isFinite(v)) {
    throw new QualityError(`device "${device.device_id}": ${key} is ${String(v)}, not a finite number`);
  }
  return v;
}

/**
 * Power class of a module whose classed power is `power_w`, or the reason it has none.
 * Steps: class P with P − minus ≤ Pmax < P + plus (default 0/+step, common practice); above
 * the highest offered class the module gets the highest class (with a positive-only tolerance
 * a lower nameplate understates, never overstates). Bins: min_w ≤ Pmax < max_w.
 */
export function powerClassOf(power_w: number, pc: PowerClasses): { label: string | null; problem: string | null } {
  const basis = pc.basis ?? 'pmp_w';
  if (pc.bins) {
    const bin = pc.bins.find((b) => b.min_w <= power_w && power_w < b.max_w);
    if (bin) return { label: bin.label, problem: null };
    const lo = Math.min(...pc.bins.map((b) => b.min_w));
    const hi = Math.max(...pc.bins.map((b) => b.max_w));
    return { label: null, problem: noClassReason(basis, power_w, lo, hi) };
  }
  const step = pc.step_w;
  if (step === undefined || !(step > 0)) throw new QualityError('power_classes needs step_w (W) or explicit bins');
  const minus = pc.tolerance?.minus_w ?? 0;
  const prefix = pc.label_prefix ?? 'P';
  // The small offset keeps a value sitting exactly on a boundary (405 W with 5 W steps) in the
  // upper class despite binary rounding of (power + minus)/step.
  let nameplate = Math.floor((power_w + minus) / step + 1e-9) * step;
  if (!(nameplate > 0)) return { label: null, problem: belowLowestReason(basis, power_w, step - minus, `${prefix}${nameplateText(step)}`, true) };
  if (pc.lowest_w !== undefined && nameplate < pc.lowest_w - 1e-9) {
    return { label: null, problem: belowLowestReason(basis, power_w, pc.lowest_w - minus, `${prefix}${nameplateText(pc.lowest_w)}`) };
  }
  if (pc.highest_w !== undefined && nameplate > pc.highest_w) nameplate = pc.highest_w;
  return { label: `${prefix}${nameplateText(nameplate)}`, problem: null };
}

/** Checks the device record's shape; throws QualityError naming the device and the field. */
function assertDevice(device: DeviceRecord, where = 'device'): void {
  if (!device || typeof device !== 'object') throw new QualityError(`${where} must be an object`);
  if (typeof device.device_id !== 'string' || device.device_id.length === 0) {
    throw new QualityError(`${where}.device_id must be a non-empty string`);
  }
  if (!device.values || typeof device.values !== 'object') {
    throw new QualityError(`device "${device.device_id}": values must be an object keyed by parameter`);
  }
  if (device.absent !== undefined && (typeof device.absent !== 'object' || device.absent === null)) {
    throw new QualityError(`device "${device.device_id}": absent must be an object of reasons keyed by parameter`);
  }
  if (device.flags !== undefined && (!Array.isArray(device.flags) || device.flags.some((f) => typeof f !== 'string'))) {
    throw new QualityError(`device "${device.device_id}": flags must be an array of flag codes`);
  }
}

/**
 * Pass or fail one device against a (validated) spec, with every reason. Bounds are
 * inclusive; a limited parameter without a value fails as "not measured"; each of the
 * device's flags listed in spec.fail_flags fails; with power classes, a module that cannot
 * be classed fails.
 */
export function evaluateDevice(device: DeviceRecord, spec: Spec): DeviceEvaluation {
  assertDevice(device);
  const reasons: FailReason[] = [];
  const rule = ruleOf(spec);
  const resolved = limitsFor(spec, device.nameplate_w);
  const limits = resolved.limits;
  let in_guard_band = false;
  for (const key of resolved.missingNameplate) {
    reasons.push({ kind: 'no_nameplate', param: key, value: null, limit: null, bound: null, message: `${labelOf(key)} has a limit relative to the nameplate, but neither the device nor the batch states a nameplate power` });
  }
  for (const key of PARAM_KEYS) {
    const lim = limits[key];
    if (!lim) continue;
    const v = valueOf(device, key);
    if (v === null) {
      const why = device.absent?.[key];
      if (why) reasons.push({ kind: 'not_measurable', param: key, value: null, limit: null, bound: null, message: `${labelOf(key)} not measurable: ${why}` });
      else reasons.push({ kind: 'not_measured', param: key, value: null, limit: null, bound: null, message: notMeasuredReason(key) });
      continue;
    }
    // The limit checks and their words under the spec's decision rule: lib/quality/decision-rules.ts.
    const u = device.uncertainty?.[key];
    reasons.push(...limitReasons(key, v, u, lim, rule, resolved.notes[key]));
    if (insideGuardBand(v, u, lim)) in_guard_band = true;
  }
  let power_class: string | null = null;
  if (spec.power_classes) {
    const basis = spec.power_classes.basis ?? 'pmp_w';
    const p = valueOf(device, basis);
    if (p === null) {
      const why = device.absent?.[basis];
      reasons.push({
        kind: 'power_class',
        param: basis,
        value: null,
        limit: null,
        bound: null,
        message: why ? `No power class, ${labelOf(basis)} not measurable: ${why}` : noPowerReason(basis),
      });
    } else {
      const classes = resolvePowerClasses(spec.power_classes, device.nameplate_w);
      const pc = classes ? powerClassOf(p, classes) : { label: null, problem: 'no power class: the classes are around the nameplate, and neither the device nor the batch states a nameplate power' };
      power_class = pc.label;
      if (pc.problem) {
        reasons.push({ kind: 'power_class', param: basis, value: p, limit: null, bound: null, message: pc.problem });
      }
    }
  }
  const fail_flags = new Set(spec.fail_flags ?? []);
  for (const flag of new Set(device.flags ?? [])) {
    if (fail_flags.has(flag)) {
      reasons.push({ kind: 'flag', param: 'flags', value: flag, limit: null, bound: null, message: flagReason(flag) });
    }
  }
  return { device_id: device.device_id, result: reasons.length ? 'fail' : 'pass', reasons, power_class, in_guard_band };
}

export type BatchDeviceEvaluation = DeviceEvaluation & {
  values: Partial<Record<ParamKey, number | null>>;
  flags: string[];
  /** Expanded uncertainty (k = 2) of the figures that carry one, in their units. */
  uncertainty: Partial<Record<ParamKey, number>>;
  /** Modified z-score per outlier-checked parameter (null when the device lacks the value). */
  robust_z: Partial<Record<ParamKey, number | null>>;
  /** Parameters on which the device is an outlier (|z| > 3.5). */
  outlier_params: ParamKey[];
  outlier: boolean;
};

export type BatchEvaluation = {
  specName: string;
  devices: BatchDeviceEvaluation[];
  counts: { total: number; pass: number; fail: number; outliers: number };
  /** The spec's decision rule and the devices with a value within its uncertainty of a limit. */
  decision_rule: DecisionRule;
  inside_guard_band: number;
  /** Devices per power class label; devices without a class are not counted here. */
  power_class_counts: Record<string, number>;
  /** Parameters checked for outliers. */
  outlier_params: ParamKey[];
  /**
   * Statistics of every parameter that is limited, outlier-checked or measured on any device,
   * with Cpk against the spec's limits; null when no device has a value.
   */
  stats: Partial<Record<ParamKey, Description | null>>;
};

export type BatchOptions = {
  /** Parameters to mark outliers on (default ['pmp_w']). */
  outlier_params?: ParamKey[];
};

/**
 * Each device's modified z-score on `key` among the devices that have the value (Iglewicz &
 * Hoaglin), and whether it is an outlier (|z| > 3.5); z null where the device lacks the value.
 */
export function robustZOn(devices: readonly DeviceRecord[], key: ParamKey): { z: number | null; outlier: boolean }[] {
  const idx: number[] = [];
  const vals: number[] = [];
  devices.forEach((d, i) => {
    const v = valueOf(d, key);
    if (v !== null) {
      idx.push(i);
      vals.push(v);
    }
  });
  const out = devices.map(() => ({ z: null as number | null, outlier: false }));
  const rz = robustZ(vals);
  idx.forEach((devIndex, j) => {
    out[devIndex] = { z: rz.z[j], outlier: rz.isOutlier[j] };
  });
  return out;
}

/**
 * Evaluates every device, marks robust outliers (Iglewicz & Hoaglin modified z, |z| > 3.5)
 * on the chosen parameters, counts pass/fail/outliers and describes each parameter.
 * Outliers are marked, not failed: the QA lead decides.
 */
export function evaluateBatch(devices: readonly DeviceRecord[], spec: Spec, options: BatchOptions = {}): BatchEvaluation {
  if (!Array.isArray(devices)) throw new QualityError('devices must be an array of device records');
  devices.forEach((d, i) => assertDevice(d, `devices[${i}]`));
  const outlier_params: ParamKey[] = [...new Set<ParamKey>(options.outlier_params ?? ['pmp_w'])];
  for (const k of outlier_params) {
    if (!isParamKey(k)) throw new QualityError(`outlier_params: unknown parameter "${String(k)}"`);
  }
  const evaluated: BatchDeviceEvaluation[] = devices.map((d) => {
    const e = evaluateDevice(d, spec);
    // Written out rather than spread: this runs for every device of a 10,000-curve comparison.
    return { device_id: e.device_id, result: e.result, reasons: e.reasons, power_class: e.power_class, in_guard_band: e.in_guard_band, values: Object.assign({}, d.values), flags: d.flags ? d.flags.slice() : [], uncertainty: Object.assign({}, d.uncertainty), robust_z: {}, outlier_params: [], outlier: false };
  });

  for (const key of outlier_params) {
    const marks = robustZOn(devices, key);
    marks.forEach((m, i) => {
      evaluated[i].robust_z[key] = m.z;
      if (m.outlier) evaluated[i].outlier_params.push(key);
    });
  }
  for (const e of evaluated) e.outlier = e.outlier_params.length > 0;

  // Every parameter's values in one pass over the devices (10,000 devices × 25 parameters in a comparison).
  const columns = new Map<ParamKey, number[]>(PARAM_KEYS.map((k) => [k, []]));
  for (const d of devices) {
    for (const key of PARAM_KEYS) {
      const v = valueOf(d, key);
      if (v !== null) columns.get(key)!.push(v);
    }
  }
  const stats: BatchEvaluation['stats'] = {};
  for (const key of PARAM_KEYS) {
    const vals = columns.get(key)!;
    if (!(spec.limits?.[key] !== undefined || outlier_params.includes(key) || vals.length)) continue;
    stats[key] = vals.length ? describe(vals, spec.limits?.[key]) : null;
  }

  const power_class_counts: Record<string, number> = {};
  for (const e of evaluated) if (e.power_class) power_class_counts[e.power_class] = (power_class_counts[e.power_class] ?? 0) + 1;

  const pass = evaluated.filter((e) => e.result === 'pass').length;
  return {
    specName: spec.name,
    devices: evaluated,
    counts: { total: evaluated.length, pass, fail: evaluated.length - pass, outliers: evaluated.filter((e) => e.outlier).length },
    decision_rule: ruleOf(spec),
    inside_guard_band: evaluated.filter((e) => e.in_guard_band).length,
    power_class_counts,
    outlier_params,
    stats,
  };
}
