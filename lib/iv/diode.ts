/**
 * Single- and double-diode equivalent circuits of a device of `cells` cells in series:
 *
 *   I = Iph − Σ I0k·[exp((V + I·Rs)/(nk·cells·Vt)) − 1] − (V + I·Rs)/Rsh
 *
 * Single diode: explicit Lambert W form (Jain & Kapoor 2004, Sol. Energy Mater. Sol. Cells
 * 81:269) evaluated in log form so a 72-cell module at any bias never overflows.
 * Double diode: no closed form; a Newton iteration on I that converges monotonically because
 * the residual is decreasing and concave in I (see `solveDoubleDiodeCurrent`).
 */
import { thermal_voltage_v } from '@/lib/physics/constants';
import { IvInputError } from '@/lib/iv/errors';
import { lambertWExp } from '@/lib/iv/lambert-w';
import type { DoubleDiodeParams, IvCurve, SingleDiodeParams } from '@/lib/iv/types';

/** Modified ideality voltage a = n·cells·kT/q, V. */
export function idealityVoltage_V(n: number, cells: number, temp_c: number): number {
  return n * cells * thermal_voltage_v(temp_c);
}

/**
 * Single-diode current, A, at terminal voltage v given a = n·cells·Vt (V).
 * Kernel used by the fits; parameters as plain numbers for speed.
 */
export function sdCurrent(iph: number, i0: number, a: number, rs: number, rsh: number, v: number): number {
  if (rs <= 0) return iph - (Math.exp(Math.log(i0) + v / a) - i0) - v / rsh;
  const s = rs + rsh;
  // Sum of logs rather than the log of a product: rs·i0·rsh underflows to 0 for Rs → 0.
  const x = Math.log(rs) + Math.log(i0) + Math.log(rsh) - Math.log(a) - Math.log(s) + (rsh * (rs * (iph + i0) + v)) / (a * s);
  const w = lambertWExp(x);
  // (a/Rs)·W = exp(x + ln(a/Rs) − W) because W·e^W = e^x; the exponential form keeps full
  // precision when Rs is tiny and W ≪ 1.
  const diode = w < 1 ? Math.exp(x + Math.log(a) - Math.log(rs) - w) : (a / rs) * w;
  return (rsh * (iph + i0) - v) / s - diode;
}

/** Single-diode terminal voltage, V, at current i (A) given a = n·cells·Vt (V). */
export function sdVoltage(iph: number, i0: number, a: number, rs: number, rsh: number, i: number): number {
  const u = (rsh * (iph + i0 - i)) / a;
  const lnC = Math.log((i0 * rsh) / a);
  const x = lnC + u;
  const w = lambertWExp(x);
  // Vd = a·(u − W); written as a·(ln W − ln C) to avoid cancelling two large numbers when Rsh is large.
  const lnW = x < -40 ? x - w : Math.log(w);
  const vd = a * (lnW - lnC);
  return vd - i * rs;
}

/**
 * Double-diode current, A, at voltage v by Newton on F(I) = Iph − D(V + I·Rs) − (V + I·Rs)/Rsh − I.
 * F is strictly decreasing and concave in I, so from a point right of the root Newton descends
 * monotonically; from the left the first step overshoots to the right, capped by the bound
 * I ≤ Iph + I01 + I02 + max(0, −V)/Rsh. `guess` (e.g. the measured current) speeds it up.
 * Stops when a step is below 1e-14 of max(|I|, Iph): F sums terms of the size of Iph, so near Voc
 * (I → 0) a step relative to I alone never gets below the rounding noise and Newton used to run
 * to its iteration cap on every such point (a third of a double-diode fit's time, measured).
 */
export function solveDoubleDiodeCurrent(
  iph: number,
  i01: number,
  a1: number,
  i02: number,
  a2: number,
  rs: number,
  rsh: number,
  v: number,
  guess?: number,
): number {
  const hi = iph + i01 + i02 + Math.max(0, -v) / rsh;
  const ln01 = Math.log(i01);
  const ln02 = Math.log(i02);
  // The diodes' current at v (no closure here: this runs for every point of every fit step, and
  // under tsx, whose esbuild keeps function names, each closure made costs a defineProperty call).
  const dv = Math.exp(Math.min(ln01 + v / a1, 700)) - i01 + Math.exp(Math.min(ln02 + v / a2, 700)) - i02;
  if (rs <= 0) return iph - dv - v / rsh;
  let i = guess !== undefined && Number.isFinite(guess) ? Math.min(guess, hi) : Math.min(iph - dv - v / rsh, hi);
  for (let k = 0; k < 200; k++) {
    const vd = v + i * rs;
    const e1 = Math.exp(Math.min(ln01 + vd / a1, 700));
    const e2 = Math.exp(Math.min(ln02 + vd / a2, 700));
    const F = iph - (e1 - i01) - (e2 - i02) - vd / rsh - i;
    const dF = -rs * (e1 / a1 + e2 / a2 + 1 / rsh) - 1;
    let next = i - F / dF;
    if (next > hi) next = hi;
    if (Math.abs(next - i) <= 1e-14 * Math.max(Math.abs(i), Math.abs(next), Math.abs(iph), 1e-12)) return next;
    i = next;
  }
  return i;
}

/** Double-diode terminal voltage, V, at current i (A): Newton on the diode voltage, monotone from above. */
export function solveDoubleDiodeVoltage(
  iph: number,
  i01: number,
  a1: number,
  i02: number,
  a2: number,
  rs: number,
  rsh: number,
  i: number,
): number {
  const target = iph - i;
  // Start where the first diode alone already carries more than Iph − I: G(vd) ≤ 0 there.
  let vd = Math.max(a1 * Math.log1p(Math.max(target, 0) / i01), a2 * Math.log1p(Math.max(target, 0) / i02));
  if (target < 0) vd = Math.min(0, target * rsh);
  for (let k = 0; k < 200; k++) {
    const e1 = i01 * Math.exp(vd / a1);
    const e2 = i02 * Math.exp(vd / a2);
    const G = target - (e1 - i01) - (e2 - i02) - vd / rsh;
    const dG = -(e1 / a1 + e2 / a2 + 1 / rsh);
    const step = G / dG;
    vd -= step;
    if (Math.abs(step) <= 1e-15 * Math.max(Math.abs(vd), 1e-9)) break;
  }
  return vd - i * rs;
}

function checkParams(p: Record<string, number>, where: string): void {
  for (const [key, value] of Object.entries(p)) {
    if (!Number.isFinite(value)) throw new IvInputError('bad-parameter', `${where}: ${key} must be a finite number, got ${value}`);
  }
  for (const key of ['i0_a', 'i01_a', 'i02_a', 'n', 'n1', 'n2', 'rsh_ohm']) {
    if (key in p && !(p[key] > 0)) throw new IvInputError('bad-parameter', `${where}: ${key} must be positive, got ${p[key]}`);
  }
  if (p.rs_ohm < 0) throw new IvInputError('bad-parameter', `${where}: rs_ohm must not be negative, got ${p.rs_ohm}`);
}

function checkConditions(cells: number, temp_c: number, where: string): void {
  if (!(Number.isInteger(cells) && cells >= 1)) throw new IvInputError('bad-parameter', `${where}: cells must be a whole number ≥ 1, got ${cells}`);
  if (!(Number.isFinite(temp_c) && temp_c > -273.15)) throw new IvInputError('bad-parameter', `${where}: temp_c must be above absolute zero, got ${temp_c}`);
}

/** Single-diode current, A, at terminal voltage voltage_v for `cells` in series at cell temperature temp_c (°C). */
export function singleDiodeCurrent(p: SingleDiodeParams, voltage_v: number, cells: number, temp_c: number): number {
  checkParams(p, 'singleDiodeCurrent');
  checkConditions(cells, temp_c, 'singleDiodeCurrent');
  return sdCurrent(p.iph_a, p.i0_a, idealityVoltage_V(p.n, cells, temp_c), p.rs_ohm, p.rsh_ohm, voltage_v);
}

/** Single-diode currents, A, at each voltage in voltages_v. */
export function singleDiodeCurrents(p: SingleDiodeParams, voltages_v: readonly number[], cells: number, temp_c: number): number[] {
  checkParams(p, 'singleDiodeCurrents');
  checkConditions(cells, temp_c, 'singleDiodeCurrents');
  const a = idealityVoltage_V(p.n, cells, temp_c);
  return voltages_v.map((v) => sdCurrent(p.iph_a, p.i0_a, a, p.rs_ohm, p.rsh_ohm, v));
}

/** Single-diode terminal voltage, V, at current current_a (explicit Lambert W form). */
export function singleDiodeVoltage(p: SingleDiodeParams, current_a: number, cells: number, temp_c: number): number {
  checkParams(p, 'singleDiodeVoltage');
  checkConditions(cells, temp_c, 'singleDiodeVoltage');
  return sdVoltage(p.iph_a, p.i0_a, idealityVoltage_V(p.n, cells, temp_c), p.rs_ohm, p.rsh_ohm, current_a);
}

/** Double-diode current, A, at terminal voltage voltage_v (n1, n2 per cell). */
export function doubleDiodeCurrent(p: DoubleDiodeParams, voltage_v: number, cells: number, temp_c: number): number {
  checkParams(p, 'doubleDiodeCurrent');
  checkConditions(cells, temp_c, 'doubleDiodeCurrent');
  const a1 = idealityVoltage_V(p.n1, cells, temp_c);
  const a2 = idealityVoltage_V(p.n2, cells, temp_c);
  return solveDoubleDiodeCurrent(p.iph_a, p.i01_a, a1, p.i02_a, a2, p.rs_ohm, p.rsh_ohm, voltage_v);
}

/** Double-diode terminal voltage, V, at current current_a. */
export function doubleDiodeVoltage(p: DoubleDiodeParams, current_a: number, cells: number, temp_c: number): number {
  checkParams(p, 'doubleDiodeVoltage');
  checkConditions(cells, temp_c, 'doubleDiodeVoltage');
  const a1 = idealityVoltage_V(p.n1, cells, temp_c);
  const a2 = idealityVoltage_V(p.n2, cells, temp_c);
  return solveDoubleDiodeVoltage(p.iph_a, p.i01_a, a1, p.i02_a, a2, p.rs_ohm, p.rsh_ohm, current_a);
}

/** Options of `simulateCurve`. Defaults: vMin 0 V, vMax 1.02·Voc, no noise. */
export type SimulateOptions = {
  cells: number;
  temp_c: number;
  points: number;
  vMin?: number;
  vMax?: number;
  /** Standard deviation of Gaussian noise added to the current, A. */
  noise_a?: number;
  /** Seed of the deterministic noise generator. */
  seed?: number;
};

/** Deterministic PRNG (mulberry32) so simulated noisy curves are reproducible. */
export function seededRandom(seed: number): () => number {
  let t = seed >>> 0;
  return () => {
    t = (t + 0x6d2b79f5) >>> 0;
    let r = Math.imul(t ^ (t >>> 15), 1 | t);
    r ^= r + Math.imul(r ^ (r >>> 7), 61 | r);
    return ((r ^ (r >>> 14)) >>> 0) / 4294967296;
  };
}

/** Standard normal deviates from a uniform generator (Box–Muller). */
export function gaussian(random: () => number): () => number {
  return () => {
    const u = 1 - random();
    return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * random());
  };
}

/**
 * Curve of a single- or double-diode device on an even voltage grid, generator convention.
 * Used by tests, demo data and translation; `meta` carries cells and temp_c.
 */
export function simulateCurve(p: SingleDiodeParams | DoubleDiodeParams, opts: SimulateOptions): IvCurve {
  const { cells, temp_c, points } = opts;
  checkConditions(cells, temp_c, 'simulateCurve');
  if (!(Number.isInteger(points) && points >= 2)) throw new IvInputError('bad-parameter', `simulateCurve: points must be a whole number ≥ 2, got ${points}`);
  const current = (v: number) => ('i0_a' in p ? singleDiodeCurrent(p, v, cells, temp_c) : doubleDiodeCurrent(p, v, cells, temp_c));
  const voc = 'i0_a' in p ? singleDiodeVoltage(p, 0, cells, temp_c) : doubleDiodeVoltage(p, 0, cells, temp_c);
  const vMin = opts.vMin ?? 0;
  const vMax = opts.vMax ?? 1.02 * voc;
  if (!(Number.isFinite(vMin) && Number.isFinite(vMax) && vMax > vMin)) {
    throw new IvInputError('bad-parameter', `simulateCurve: need vMin < vMax, got ${vMin} and ${vMax}`);
  }
  const noise = opts.noise_a ?? 0;
  const normal = gaussian(seededRandom(opts.seed ?? 1));
  const voltage_v: number[] = [];
  const current_a: number[] = [];
  for (let k = 0; k < points; k++) {
    const v = vMin + ((vMax - vMin) * k) / (points - 1);
    voltage_v.push(v);
    current_a.push(current(v) + (noise > 0 ? noise * normal() : 0));
  }
  return { voltage_v, current_a, meta: { cells, temp_c }, notes: ['simulated'] };
}
