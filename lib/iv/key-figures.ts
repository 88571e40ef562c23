/**
 * Key figures of a measured curve without a model: Isc, Voc, MPP, FF, efficiency and the
 * slopes at Isc and Voc, each from a local least-squares fit rather than a single sample
 * (DOMAIN.md), plus flags for shape problems.
 */
import { goldenMax } from '@/lib/numeric/golden';
import { IvInputError } from '@/lib/iv/errors';
import { fitLocalPoly, polySlope, polyValue } from '@/lib/iv/local-fit';
import { checkCurveReach, MIN_POINTS } from '@/lib/iv/parse';
import type { Flag, IvCurve, Metrics } from '@/lib/iv/types';
import { ELV_LIMIT_V, isAboveElv } from '@/lib/strings/cautions';

/** Half-width of the window around V = 0 used for Isc and Rsh0, as a fraction of Voc. */
const ISC_WINDOW = 0.1;
/** Half-width of the window around I = 0 used for Voc and Rs0, as a fraction of Isc. */
const VOC_WINDOW = 0.1;
/** Points with at least this share of the largest sampled power enter the MPP fit. */
const MPP_WINDOW = 0.9;
/** (common practice) a shunt that draws more than 5 % of Isc at Voc is worth a look: Rsh0 < 20·Voc/Isc. */
const LOW_SHUNT_RATIO = 20;
/** (common practice) Rs0·Isc/Voc above 0.2 means series resistance, not the diode, shapes the Voc side. */
const HIGH_SERIES_RATIO = 0.2;
/** Point-to-point scatter above this share of Isc is called noisy. */
const NOISE_LIMIT = 0.005;
/** A dip below the concave envelope larger than this share of Isc (and 8 noise σ) is a step. */
const STEP_LIMIT = 0.03;

/** Throws unless the arrays form a usable curve; returns sorted copies. */
export function validateCurve(curve: IvCurve): { v: number[]; i: number[] } {
  const { voltage_v, current_a } = curve ?? ({} as IvCurve);
  if (!Array.isArray(voltage_v) || !Array.isArray(current_a)) throw new IvInputError('bad-curve', 'the curve needs voltage_v and current_a arrays');
  if (voltage_v.length !== current_a.length) {
    throw new IvInputError('bad-curve', `voltage_v has ${voltage_v.length} values but current_a has ${current_a.length}`);
  }
  if (voltage_v.length < MIN_POINTS) throw new IvInputError('too-few-points', `the curve has ${voltage_v.length} points; at least ${MIN_POINTS} are needed`);
  for (let k = 0; k < voltage_v.length; k++) {
    if (!Number.isFinite(voltage_v[k]) || !Number.isFinite(current_a[k])) {
      throw new IvInputError('non-finite', `point ${k + 1} of the curve is not a finite number (V=${voltage_v[k]}, I=${current_a[k]})`);
    }
  }
  const order = voltage_v.map((_, k) => k).sort((a, b) => voltage_v[a] - voltage_v[b]);
  const v = order.map((k) => voltage_v[k]);
  const i = order.map((k) => current_a[k]);
  for (let k = 1; k < v.length; k++) {
    if (v[k] === v[k - 1]) throw new IvInputError('bad-curve', `the curve has two points at ${v[k]} V; average repeated voltages first`);
  }
  return { v, i };
}

/**
 * Robust estimate of the current noise σ (A): each interior point is predicted from a quadratic
 * through its two neighbours on either side; σ from the median absolute prediction error.
 * The factor 35/18 is the error variance of that prediction on an even grid (1 + Σw²).
 */
export function estimateNoise_A(v: readonly number[], i: readonly number[]): number {
  const residuals: number[] = [];
  for (let k = 2; k < v.length - 2; k++) {
    // Least-squares quadratic y = c0 + c1·t + c2·t² through the four neighbours, t = (V − V_k)/h;
    // its value at t = 0 is c0, solved from the 3×3 normal equations by Cramer's rule.
    const h = Math.max(v[k + 2] - v[k], v[k] - v[k - 2]);
    let s1 = 0;
    let s2 = 0;
    let s3 = 0;
    let s4 = 0;
    let y0 = 0;
    let y1 = 0;
    let y2 = 0;
    for (const j of [k - 2, k - 1, k + 1, k + 2]) {
      const t = (v[j] - v[k]) / h;
      const t2 = t * t;
      s1 += t;
      s2 += t2;
      s3 += t2 * t;
      s4 += t2 * t2;
      y0 += i[j];
      y1 += t * i[j];
      y2 += t2 * i[j];
    }
    const det = 4 * (s2 * s4 - s3 * s3) - s1 * (s1 * s4 - s3 * s2) + s2 * (s1 * s3 - s2 * s2);
    if (!(Math.abs(det) > 1e-12)) continue;
    const c0 = (y0 * (s2 * s4 - s3 * s3) - s1 * (y1 * s4 - s3 * y2) + s2 * (y1 * s3 - s2 * y2)) / det;
    residuals.push(Math.abs(i[k] - c0));
  }
  if (residuals.length === 0) return 0;
  residuals.sort((a, b) => a - b);
  const median = residuals[Math.floor(residuals.length / 2)];
  return (1.4826 * median) / Math.sqrt(35 / 18);
}

/** Largest dip (A) of the curve below its concave envelope between 0 V and Voc, and where. */
function largestDip(v: readonly number[], i: readonly number[], voc: number): { dip_a: number; at_v: number } {
  const idx: number[] = [];
  for (let k = 0; k < v.length; k++) if (v[k] >= Math.min(0, v[v.length - 1]) && v[k] <= voc) idx.push(k);
  if (idx.length < 3) return { dip_a: 0, at_v: 0 };
  // A single- or double-diode curve is concave in the generator convention, so its upper
  // concave hull lies on it; a bypass-diode step or second knee leaves a dip below the hull.
  const hull: number[] = [];
  for (const k of idx) {
    while (hull.length >= 2) {
      const a = hull[hull.length - 2];
      const b = hull[hull.length - 1];
      const cross = (v[b] - v[a]) * (i[k] - i[a]) - (i[b] - i[a]) * (v[k] - v[a]);
      if (cross >= 0) hull.pop();
      else break;
    }
    hull.push(k);
  }
  let dip = 0;
  let at = v[idx[0]];
  let h = 0;
  for (const k of idx) {
    while (h < hull.length - 2 && v[hull[h + 1]] < v[k]) h++;
    const a = hull[h];
    const b = hull[Math.min(h + 1, hull.length - 1)];
    const env = a === b ? i[a] : i[a] + ((i[b] - i[a]) * (v[k] - v[a])) / (v[b] - v[a]);
    if (env - i[k] > dip) {
      dip = env - i[k];
      at = v[k];
    }
  }
  return { dip_a: dip, at_v: at };
}

const f3 = (x: number) => Number(x.toPrecision(3)).toString();

/**
 * Isc, Voc, Pmp, Imp, Vmp, FF, efficiency (when irradiance and area are in meta), Rsh0 and Rs0,
 * with flags for curves that are extrapolated, stepped, shunted, resistive or noisy.
 * Throws IvInputError for curves without a Voc or an Isc within the extrapolation limits.
 */
export function keyFigures(curve: IvCurve): { metrics: Metrics; flags: Flag[] } {
  const { v, i } = validateCurve(curve);
  return keyFiguresOfSorted(v, i, curve, true);
}

/**
 * Key figures of validated, sorted arrays; `withShapeFlags` false skips the noise and step
 * analysis (the fits need only the numbers).
 */
export function keyFiguresOfSorted(v: readonly number[], i: readonly number[], curve: IvCurve, withShapeFlags: boolean): { metrics: Metrics; flags: Flag[] } {
  checkCurveReach(v, i);
  const n = v.length;
  const flags: Flag[] = [];
  const iMaxSample = Math.max(...i);

  // --- Voc and Rs0: V as a polynomial in I about I = 0 (the curve is steep there, so V(I) is the well-posed direction).
  const crossing = i.findIndex((c) => c <= 0);
  let voc: number;
  let rs0: number | null = null;
  {
    let win: number[] = [];
    if (crossing >= 0) {
      for (let k = 0; k < n; k++) if (Math.abs(i[k]) <= VOC_WINDOW * iMaxSample) win.push(k);
      const near = [crossing - 2, crossing - 1, crossing, crossing + 1].filter((k) => k >= 0 && k < n);
      if (win.length < 4) win = Array.from(new Set([...win, ...near])).sort((a, b) => a - b);
    } else {
      win = [n - 3, n - 2, n - 1];
    }
    const degree = crossing >= 0 && win.length >= 4 ? 2 : 1;
    const poly = fitLocalPoly(
      win.map((k) => i[k]),
      win.map((k) => v[k]),
      degree,
      0,
    );
    if (poly) {
      voc = polyValue(poly, 0);
      const slope = polySlope(poly, 0);
      rs0 = slope < 0 ? -slope : null;
    } else {
      const k = Math.max(crossing, 1);
      voc = v[k - 1] + ((v[k] - v[k - 1]) * i[k - 1]) / (i[k - 1] - i[k]);
    }
    if (crossing < 0) {
      flags.push({
        code: 'voc-extrapolated',
        severity: 'warn',
        message: `The sweep stops before the current reaches zero (${f3(i[n - 1] * 1000)} mA still flowing at ${f3(v[n - 1])} V); Voc was extrapolated to ${f3(voc)} V from the last points.`,
      });
    }
  }

  // --- Isc and Rsh0: straight line I(V) about V = 0.
  let isc: number;
  let rsh0: number | null = null;
  {
    let win: number[] = [];
    for (let k = 0; k < n; k++) if (Math.abs(v[k]) <= ISC_WINDOW * voc) win.push(k);
    if (win.length < 2) {
      // Sparse sweeps: the two samples nearest 0 V; a third one would reach into the bend.
      win = v
        .map((x, k) => ({ d: Math.abs(x), k }))
        .sort((a, b) => a.d - b.d)
        .slice(0, 2)
        .map((e) => e.k)
        .sort((a, b) => a - b);
    }
    const poly = fitLocalPoly(
      win.map((k) => v[k]),
      win.map((k) => i[k]),
      1,
      0,
    );
    isc = poly ? poly.coef[0] : i[0];
    const slope = poly ? poly.coef[1] : 0;
    // A slope flatter than 1e-6·Isc/Voc is below what any tracer resolves: not a resistance.
    rsh0 = slope < 0 && -1 / slope < (1e6 * voc) / isc ? -1 / slope : null;
    if (v[0] > 0) {
      const share = v[0] / voc;
      flags.push({
        code: 'isc-extrapolated',
        severity: share > 0.02 ? 'warn' : 'info',
        message: `The sweep starts at ${f3(v[0])} V, not at 0 V; Isc was extrapolated over that gap (${f3(share * 100)} % of Voc; allowed up to 10 %).`,
      });
    }
  }

  // --- MPP: local polynomial I(V) around the largest sampled power, then the maximum of V·I(V).
  const p = v.map((x, k) => x * i[k]);
  let kMax = 0;
  for (let k = 1; k < n; k++) if (p[k] > p[kMax]) kMax = k;
  let lo = kMax;
  let hi = kMax;
  while (lo > 0 && p[lo - 1] >= MPP_WINDOW * p[kMax]) lo--;
  while (hi < n - 1 && p[hi + 1] >= MPP_WINDOW * p[kMax]) hi++;
  while (hi - lo + 1 < 5 && (lo > 0 || hi < n - 1)) {
    if (lo > 0) lo--;
    if (hi - lo + 1 < 5 && hi < n - 1) hi++;
  }
  let vmp = v[kMax];
  let pmp = p[kMax];
  {
    // Degree up to 4 follows the knee without a bias (a quadratic or cubic over the 90 % window
    // misses the MPP of a 26-point curve by 0.1–0.5 %); two spare points keep it a fit.
    const count = hi - lo + 1;
    const degree = Math.max(2, Math.min(4, count - 2));
    const poly = fitLocalPoly(v.slice(lo, hi + 1), i.slice(lo, hi + 1), degree, v[kMax]);
    if (poly) {
      // Golden-section search of V·I(V) on the window; the product is unimodal near the MPP.
      const power = (x: number) => x * polyValue(poly, x);
      const x = goldenMax(power, v[lo], v[hi], 1e-12 * Math.max(1, Math.abs(v[hi])), 80);
      const px = power(x);
      // An interior optimum of the local fit; at the window's edge the fit is not trusted.
      if (Number.isFinite(px) && px > 0 && x > v[lo] && x < v[hi]) {
        vmp = x;
        pmp = px;
      }
    }
  }
  const imp = pmp / vmp;

  if (!(isc > 0) || !(voc > 0) || !(pmp > 0)) {
    throw new IvInputError('no-power', `the curve delivers no power (Isc ${f3(isc)} A, Voc ${f3(voc)} V); check the sign and the columns`);
  }
  const ff = pmp / (isc * voc);
  const { irradiance_w_m2: g, area_cm2: area } = curve.meta ?? {};
  const efficiency = g && area && g > 0 && area > 0 ? pmp / (g * area * 1e-4) : null;

  if (isAboveElv(voc)) {
    flags.push({
      code: 'high-voltage',
      severity: 'info',
      message: `Voc is ${f3(voc)} V, above the ${ELV_LIMIT_V} V DC usually taken as safe to touch: the device is live whenever light falls on it. Guidance only; local electrical codes apply.`,
    });
  }
  const metrics: Metrics = { isc_a: isc, voc_v: voc, pmp_w: pmp, imp_a: imp, vmp_v: vmp, ff, efficiency, rsh0_ohm: rsh0, rs0_ohm: rs0 };
  if (!withShapeFlags) return { metrics, flags };

  // --- Flags on the shape.
  const noise = estimateNoise_A(v, i);
  if (noise > NOISE_LIMIT * isc) {
    flags.push({
      code: 'noisy',
      severity: 'warn',
      message: `The current scatters by about ${f3(noise * 1000)} mA from point to point (${f3((noise / isc) * 100)} % of Isc): check the contacts, the four-wire connection and the flash stability.`,
    });
  }
  const dip = largestDip(v, i, voc);
  if (dip.dip_a > Math.max(STEP_LIMIT * isc, 8 * noise)) {
    flags.push({
      code: 'step',
      severity: 'fail',
      message: `The curve has a step or second knee near ${f3(dip.at_v)} V (it dips ${f3((dip.dip_a / isc) * 100)} % of Isc below a smooth curve): part of the device is limiting the current, for example a conducting bypass diode, mismatched or cracked cells.`,
    });
  }
  if (rsh0 !== null && rsh0 < (LOW_SHUNT_RATIO * voc) / isc) {
    flags.push({
      code: 'low-shunt',
      severity: 'warn',
      message: `The shunt resistance at Isc is low (${f3(rsh0)} Ω): the shunt path draws about ${f3((voc / rsh0 / isc) * 100)} % of Isc at Voc. Look for cracks, edge leakage or damaged cells.`,
    });
  }
  if (rs0 !== null && (rs0 * isc) / voc > HIGH_SERIES_RATIO) {
    flags.push({
      code: 'high-series-resistance',
      severity: 'warn',
      message: `The slope at Voc is shallow (${f3(rs0)} Ω): series resistance is high. Check the contacts, fingers, ribbons and solder joints.`,
    });
  }

  return { metrics, flags };
}
