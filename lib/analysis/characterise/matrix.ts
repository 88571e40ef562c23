/**
 * The irradiance–temperature power matrix of IEC 61853-1: Pmax, Voc, Isc and FF at each grid point
 * the measured curves cover.
 * Grid (memory of IEC 61853-1:2011, Table 2; the standard was not at hand): irradiances 100, 200,
 * 400, 600, 800, 1000, 1100 W/m² at cell temperatures 15, 25, 50, 75 °C, without 1100 W/m² at
 * 15 °C and without 100 and 200 W/m² at 75 °C (conditions that do not occur outdoors).
 * - A grid point with a curve measured within ±2 % and ±2 K (the STC window's tolerances,
 *   lib/analysis/stc.ts; common practice) is **measured**: that curve's own figures.
 * - Else, when the point lies inside the region the measured conditions span (their convex hull in
 *   ln G and T, widened by the same tolerances), it is **translated** from the nearest curve by
 *   the IEC 60891 procedure whose determined parameters reproduced the curves best (smaller
 *   determination residual). Outside that region it is not covered: interpolation only, never
 *   extrapolation.
 * `interpolateMatrix` reads the matrix between grid points, bilinear in G and T (IEC 61853-1
 * leaves the reading between points to the user; bilinear is chosen here).
 */
import { translatedFigures } from '@/lib/analysis/characterise/translate-figures';
import type { Procedure } from '@/lib/analysis/characterise/translate-figures';
import type { CellFigures, CharCurve } from '@/lib/analysis/characterise/types';

export const MATRIX_IRRADIANCES_W_M2 = [100, 200, 400, 600, 800, 1000, 1100] as const;
export const MATRIX_TEMPS_C = [15, 25, 50, 75] as const;
/** Grid points left out of the matrix (memory of IEC 61853-1, see above). */
export const MATRIX_EXCLUDED: readonly (readonly [number, number])[] = [
  [1100, 15],
  [100, 75],
  [200, 75],
];
export const MATRIX_WINDOW = { irradiance_pct: 2, temp_k: 2 } as const;

export type MatrixCell = CellFigures & {
  irradiance_wm2: number;
  temp_c: number;
  source: 'measured' | 'translated';
  /** The curve the figures come from. */
  curve: string;
  /** How a translated cell was made ('iec60891-1' or 'iec60891-2'); null when measured. */
  procedure: 'iec60891-1' | 'iec60891-2' | null;
};
export type Uncovered = { irradiance_wm2: number; temp_c: number; reason: string };

/** Coordinates in which the measurement window is one unit: ln G over 2 %, T over 2 K. */
const coord = (g: number, t: number): [number, number] => [Math.log(g) / (MATRIX_WINDOW.irradiance_pct / 100), t / MATRIX_WINDOW.temp_k];

function hull(points: [number, number][]): [number, number][] {
  const p = [...points].sort((a, b) => a[0] - b[0] || a[1] - b[1]);
  if (p.length < 3) return p;
  const cross = (o: number[], a: number[], b: number[]) => (a[0] - o[0]) * (b[1] - o[1]) - (a[1] - o[1]) * (b[0] - o[0]);
  const lower: [number, number][] = [];
  for (const q of p) {
    while (lower.length >= 2 && cross(lower[lower.length - 2], lower[lower.length - 1], q) <= 0) lower.pop();
    lower.push(q);
  }
  const upper: [number, number][] = [];
  for (const q of [...p].reverse()) {
    while (upper.length >= 2 && cross(upper[upper.length - 2], upper[upper.length - 1], q) <= 0) upper.pop();
    upper.push(q);
  }
  return [...lower.slice(0, -1), ...upper.slice(0, -1)];
}

function segmentDistance(q: [number, number], a: [number, number], b: [number, number]): number {
  const dx = b[0] - a[0];
  const dy = b[1] - a[1];
  const len2 = dx * dx + dy * dy;
  const t = len2 > 0 ? Math.max(0, Math.min(1, ((q[0] - a[0]) * dx + (q[1] - a[1]) * dy) / len2)) : 0;
  return Math.hypot(q[0] - a[0] - t * dx, q[1] - a[1] - t * dy);
}

/** Whether (g, t) lies inside the measured conditions' hull or within one window of it. */
export function covered(curves: readonly CharCurve[], g: number, t: number): boolean {
  const h = hull(curves.map((c) => coord(c.irradiance_w_m2, c.temp_c)));
  const q = coord(g, t);
  if (h.length >= 3) {
    let inside = true;
    for (let k = 0; k < h.length; k++) {
      const a = h[k];
      const b = h[(k + 1) % h.length];
      if ((b[0] - a[0]) * (q[1] - a[1]) - (b[1] - a[1]) * (q[0] - a[0]) < 0) inside = false;
    }
    if (inside) return true;
  }
  if (h.length === 1) return Math.hypot(q[0] - h[0][0], q[1] - h[0][1]) <= Math.SQRT2;
  for (let k = 0; k < h.length; k++) if (segmentDistance(q, h[k], h[(k + 1) % h.length]) <= Math.SQRT2) return true;
  return false;
}

/**
 * Curves in the order a cell is made from them: a kelvin of temperature change counts as much as
 * 5 % of irradiance. Moving a curve in irradiance by the determined Rs reproduced the invented
 * module of the tests far better than moving it in temperature by κ (κ is determined at one
 * irradiance and holds less well at others), so same-temperature sources come first.
 */
function byDistance(curves: readonly CharCurve[], g: number, t: number): CharCurve[] {
  const d = (c: CharCurve) => Math.abs(Math.log(c.irradiance_w_m2 / g)) / 0.05 + Math.abs(c.temp_c - t);
  return [...curves].sort((a, b) => d(a) - d(b));
}

const within = (c: CharCurve, g: number, t: number) =>
  Math.abs(Math.log(c.irradiance_w_m2 / g)) <= MATRIX_WINDOW.irradiance_pct / 100 + 1e-12 && Math.abs(c.temp_c - t) <= MATRIX_WINDOW.temp_k + 1e-12;

/** How many of the nearest curves a translated cell may be made from before it is given up. */
const SOURCE_CANDIDATES = 4;

/**
 * The matrix cells the curves cover and the grid points they do not, each with its reason.
 * `procedures` in order of preference: a cell is translated from the nearest curve by the first
 * that gives key figures (procedure 1 moved up in irradiance may leave a curve that no longer
 * reaches Voc; then the next curve or procedure is tried).
 */
export function powerMatrix(curves: readonly CharCurve[], procedures: readonly Procedure[], procedureError?: string): { matrix: MatrixCell[]; not_covered: Uncovered[] } {
  const matrix: MatrixCell[] = [];
  const not_covered: Uncovered[] = [];
  if (!curves.length) return { matrix, not_covered };
  for (const t of MATRIX_TEMPS_C) {
    for (const g of MATRIX_IRRADIANCES_W_M2) {
      if (MATRIX_EXCLUDED.some(([eg, et]) => eg === g && et === t)) continue;
      const order = byDistance(curves, g, t);
      if (within(order[0], g, t)) {
        const c = order[0];
        const m = c.metrics;
        matrix.push({ irradiance_wm2: g, temp_c: t, pmp_w: m.pmp_w, voc_v: m.voc_v, isc_a: m.isc_a, ff_pct: 100 * m.ff, source: 'measured', curve: c.id, procedure: null });
        continue;
      }
      if (!covered(curves, g, t)) {
        not_covered.push({ irradiance_wm2: g, temp_c: t, reason: 'outside the conditions the curves were measured at (no extrapolation)' });
        continue;
      }
      if (!procedures.length) {
        not_covered.push({ irradiance_wm2: g, temp_c: t, reason: `no curve measured here and no IEC 60891 parameters to translate one (${procedureError ?? 'not determined'})` });
        continue;
      }
      let cell: MatrixCell | null = null;
      let why = '';
      for (const procedure of procedures) {
        for (const c of order.slice(0, SOURCE_CANDIDATES)) {
          try {
            const f = translatedFigures(c, { irradiance_w_m2: g, temp_c: t }, procedure);
            if (![f.pmp_w, f.voc_v, f.isc_a].every((x) => Number.isFinite(x) && x > 0)) throw new Error('figures not positive');
            cell = { irradiance_wm2: g, temp_c: t, ...f, source: 'translated', curve: c.id, procedure: procedure.procedure === 1 ? 'iec60891-1' : 'iec60891-2' };
            break;
          } catch (err) {
            why = `the translation of ${c.id} gave no key figures (${err instanceof Error ? err.message : String(err)})`;
          }
        }
        if (cell) break;
      }
      if (cell) matrix.push(cell);
      else not_covered.push({ irradiance_wm2: g, temp_c: t, reason: why });
    }
  }
  return { matrix, not_covered };
}

type Key = keyof CellFigures;
const KEYS: Key[] = ['pmp_w', 'voc_v', 'isc_a', 'ff_pct'];

/** The matrix read at (g, t), bilinear between the four grid points around it; an error outside the filled grid. */
export function interpolateMatrix(matrix: readonly MatrixCell[], g: number, t: number): CellFigures | { error: string } {
  const at = (gg: number, tt: number) => matrix.find((c) => c.irradiance_wm2 === gg && c.temp_c === tt);
  const around = (grid: readonly number[], x: number): [number, number] | null => {
    if (x < grid[0] || x > grid[grid.length - 1]) return null;
    for (let k = 0; k < grid.length - 1; k++) if (x >= grid[k] && x <= grid[k + 1]) return x === grid[k + 1] ? [grid[k + 1], grid[k + 1]] : [grid[k], grid[k + 1]];
    return [x, x];
  };
  const gs = around(MATRIX_IRRADIANCES_W_M2, g);
  const ts = around(MATRIX_TEMPS_C, t);
  if (!gs || !ts) return { error: `${g} W/m² and ${t} °C lie outside the matrix grid (no extrapolation)` };
  const corners = [at(gs[0], ts[0]), at(gs[1], ts[0]), at(gs[0], ts[1]), at(gs[1], ts[1])];
  if (corners.some((c) => !c)) return { error: `the matrix has no figures at every grid point around ${g} W/m² and ${t} °C` };
  const [c00, c10, c01, c11] = corners as MatrixCell[];
  const u = gs[1] === gs[0] ? 0 : (g - gs[0]) / (gs[1] - gs[0]);
  const w = ts[1] === ts[0] ? 0 : (t - ts[0]) / (ts[1] - ts[0]);
  const out = {} as CellFigures;
  for (const k of KEYS) out[k] = (1 - u) * (1 - w) * c00[k] + u * (1 - w) * c10[k] + (1 - u) * w * c01[k] + u * w * c11[k];
  return out;
}

/** Relative efficiency (Pmax/G over its value at 1000 W/m²) at 25 °C, from the matrix; efficiency in % when the area is known. */
export function efficiencyAt25(matrix: readonly MatrixCell[], area_cm2?: number): { irradiance_wm2: number; relative_efficiency_pct: number; eff_pct: number | null; source: MatrixCell['source'] }[] {
  const row = matrix.filter((c) => c.temp_c === 25).sort((a, b) => a.irradiance_wm2 - b.irradiance_wm2);
  const ref = row.find((c) => c.irradiance_wm2 === 1000);
  if (!ref) return [];
  return row.map((c) => ({
    irradiance_wm2: c.irradiance_wm2,
    relative_efficiency_pct: (100 * (c.pmp_w / c.irradiance_wm2)) / (ref.pmp_w / 1000),
    eff_pct: area_cm2 && area_cm2 > 0 ? (100 * c.pmp_w) / (c.irradiance_wm2 * area_cm2 * 1e-4) : null,
    source: c.source,
  }));
}
