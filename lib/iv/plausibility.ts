/**
 * Is a curve's cell count plausible, and does a fit describe a physical device? Warnings in
 * words for results no real cell gives, and the nearest plausible cell count when the count is
 * missing or contradicts Voc. Pure rules; lib/iv/analyse.ts raises the flags.
 *
 * The ranges are rules of thumb of the trade (common practice), not a standard:
 * - a single-junction cell in use gives 0.3–0.95 V open-circuit (below: a wrong count or unit;
 *   above 0.95 V only cells of other materials, e.g. GaAs or perovskite);
 * - a crystalline-silicon cell gives 0.50–0.75 V at 25 °C and 1000 W/m²;
 * - the ideality factor n of a silicon cell lies between 0.9 and 2.5 per cell (1 for diffusion,
 *   2 for depletion-region recombination; a little beyond for real devices).
 */
import { thermal_voltage_v } from '@/lib/physics/constants';
import type { Flag, Metrics, SingleDiodeFit } from '@/lib/iv/types';

/** Open-circuit voltage per cell any single-junction cell in use gives, V (common practice). */
export const PHYSICAL_VOC_PER_CELL_V = { min: 0.3, max: 0.95 } as const;
/** Open-circuit voltage per crystalline-silicon cell at 25 °C, 1000 W/m², V (common practice). */
export const SILICON_VOC_PER_CELL_V = { min: 0.5, max: 0.75 } as const;
/** Ideality factor per cell of a physical silicon diode (common practice). */
export const PHYSICAL_IDEALITY = { min: 0.9, max: 2.5 } as const;
/** The middle of the silicon range: what a suggestion aims at when no common design fits, V. */
const TYPICAL_VOC_PER_CELL_V = 0.625;
/** dVoc/dT of one silicon cell, V/K: −0.35 %/K of 0.63 V (common practice). */
const VOC_PER_CELL_V_PER_K = -0.0022;
/** Ideality used only to move a measured Voc to 1000 W/m² for the plausibility check (common practice). */
const CHECK_IDEALITY = 1.2;

/**
 * Cells in series of common designs, the most common first (common practice, memory): 60 and 72
 * (the usual full-cell modules), 36 (12 V-class modules), 1 (a cell), 54, 66, 48, 32, 78, 96 and
 * 128 (large back-contact designs), 40. Half-cut designs of 108, 120, 132 and 144 half cells are
 * two halves in parallel, each with 54, 60, 66 or 72 cells in series, so they are in the list by
 * those counts.
 */
export const COMMON_CELL_COUNTS = [60, 72, 36, 1, 54, 66, 48, 32, 78, 96, 128, 40] as const;

const v2 = (x: number) => x.toFixed(2);
const g3 = (x: number) => String(Number(x.toPrecision(3)));

/**
 * Voc per cell moved to 25 °C and 1000 W/m² for the silicon range: −2.2 mV/K a cell and
 * n·kT/q·ln(G/1000) with n = 1.2 (both common practice). Unknown conditions count as STC.
 */
export function vocPerCellAtStc(voc_v: number, cells: number, temp_c: number | undefined, irradiance_w_m2: number | undefined): number {
  const t = temp_c ?? 25;
  const g = irradiance_w_m2 && irradiance_w_m2 > 0 ? irradiance_w_m2 : 1000;
  return voc_v / cells - VOC_PER_CELL_V_PER_K * (t - 25) - CHECK_IDEALITY * thermal_voltage_v(t) * Math.log(g / 1000);
}

/** True when `cells` gives a silicon-like Voc per cell at STC. */
export function plausibleCells(voc_v: number, cells: number, temp_c?: number, irradiance_w_m2?: number): boolean {
  const x = vocPerCellAtStc(voc_v, cells, temp_c, irradiance_w_m2);
  return x >= SILICON_VOC_PER_CELL_V.min && x <= SILICON_VOC_PER_CELL_V.max;
}

/** A suggested count: from the common designs when one fits (`common`), else Voc / 0.625 V. */
export type CellSuggestion = { cells: number; common: boolean; voc_per_cell_v: number };

/**
 * A plausible cell count: the most common design whose Voc per cell fits (a given count that
 * contradicts Voc says nothing about the right one, so it is not used as a guide). When none of
 * them fits, the count that gives 0.625 V a cell (the middle of the silicon range).
 */
export function suggestCells(voc_v: number, temp_c: number | undefined, irradiance_w_m2: number | undefined): CellSuggestion {
  // COMMON_CELL_COUNTS is ordered most common first, and filter keeps that order.
  const best = COMMON_CELL_COUNTS.find((n) => plausibleCells(voc_v, n, temp_c, irradiance_w_m2));
  if (best !== undefined) return { cells: best, common: true, voc_per_cell_v: voc_v / best };
  const cells = Math.max(1, Math.round(vocPerCellAtStc(voc_v, 1, temp_c, irradiance_w_m2) / TYPICAL_VOC_PER_CELL_V));
  return { cells, common: false, voc_per_cell_v: voc_v / cells };
}

function suggestionText(s: CellSuggestion): string {
  const design = s.common ? 'a common design' : 'not one of the common module designs, so check the device';
  return `${s.cells} cell${s.cells === 1 ? '' : 's'} would give ${v2(s.voc_per_cell_v)} V a cell (${design})`;
}

/**
 * The cell count the fits use and what to say about it. A given count is used as given; when it
 * puts Voc per cell outside the silicon range, a `cells-check` flag suggests the most common
 * plausible count. With no count and a Voc above one cell's (1.2 V), the suggestion is used and said
 * (`cells-unknown`).
 */
export function cellCountCheck(
  metrics: Pick<Metrics, 'voc_v'>,
  given: number | undefined,
  temp_c: number | undefined,
  irradiance_w_m2: number | undefined,
): { cells: number; flag: Flag | null } {
  const voc = metrics.voc_v;
  if (!(voc > 0)) return { cells: given ?? 1, flag: null };
  if (given === undefined) {
    if (voc <= 1.2) return { cells: 1, flag: null };
    const s = suggestCells(voc, temp_c, irradiance_w_m2);
    return {
      cells: s.cells,
      flag: {
        code: 'cells-unknown',
        severity: 'warn',
        message: `No cell count was given, and Voc ${g3(voc)} V is more than one cell delivers: ${suggestionText(s)}. The fits used ${s.cells} cells in series; give the number of cells to be sure.`,
      },
    };
  }
  if (plausibleCells(voc, given, temp_c, irradiance_w_m2)) return { cells: given, flag: null };
  const s = suggestCells(voc, temp_c, irradiance_w_m2);
  const atStc = vocPerCellAtStc(voc, given, temp_c, irradiance_w_m2);
  const moved = Math.abs(atStc - voc / given) >= 0.005 ? ` (${v2(atStc)} V at 25 °C and 1000 W/m²)` : '';
  const advice = s.cells === given ? '' : ` ${suggestionText(s)}.`;
  return {
    cells: given,
    flag: {
      code: 'cells-check',
      severity: 'warn',
      message:
        `Voc ${g3(voc)} V over ${given} cell${given === 1 ? '' : 's'} is ${v2(voc / given)} V a cell${moved}, outside the ${v2(SILICON_VOC_PER_CELL_V.min)}–${v2(SILICON_VOC_PER_CELL_V.max)} V of a crystalline-silicon cell (common practice): check the cell count.` +
        `${advice} The fits used ${given} cell${given === 1 ? '' : 's'} as given; fit again with the right count.`,
    },
  };
}

/** Voc per cell outside what any cell gives (0.3–0.95 V): a wrong count or a wrong voltage unit. */
export function vocPerCellFlag(voc_v: number, cells: number): Flag | null {
  const x = voc_v / cells;
  if (!(voc_v > 0) || (x >= PHYSICAL_VOC_PER_CELL_V.min && x <= PHYSICAL_VOC_PER_CELL_V.max)) return null;
  return {
    code: 'voc-per-cell-unphysical',
    severity: 'warn',
    message: `Voc per cell is ${v2(x)} V (${g3(voc_v)} V over ${cells} cell${cells === 1 ? '' : 's'}), outside the ${PHYSICAL_VOC_PER_CELL_V.min}–${PHYSICAL_VOC_PER_CELL_V.max} V a solar cell gives (common practice): the cell count or the file's voltage unit is wrong.`,
  };
}

/**
 * Warnings on a converged single-diode fit that no physical device gives: n per cell outside
 * 0.9–2.5, or a parameter pressed against the edge of what is physical (the fit would need
 * Rs < 0, Iph ≤ 0, I0 as large as Isc, or a shunt below 1 % of Voc/Isc; the fit's bounds
 * stop it there, lib/iv/fit-single.ts).
 */
export function fitPlausibilityFlags(fit: SingleDiodeFit | undefined): Flag[] {
  if (!fit || !fit.converged || fit.n === null) return [];
  const flags: Flag[] = [];
  if (fit.n < PHYSICAL_IDEALITY.min || fit.n > PHYSICAL_IDEALITY.max) {
    flags.push({
      code: 'ideality-unphysical',
      severity: 'warn',
      message: `The single-diode fit gives an ideality factor n = ${g3(fit.n)} per cell, outside the ${PHYSICAL_IDEALITY.min}–${PHYSICAL_IDEALITY.max} of a real silicon diode (common practice): its parameters do not describe a physical device. Check the cell count, the temperature and the curve's shape.`,
    });
  }
  const needs: string[] = [];
  const at = new Set(fit.at_bounds ?? []);
  if ((fit.rs_ohm !== null && fit.rs_ohm < 0) || (at.has('rs_ohm') && (fit.rs_ohm ?? 0) <= 1e-9)) needs.push('a series resistance below 0 Ω');
  if ((fit.iph_a !== null && fit.iph_a <= 0) || (at.has('iph_a') && (fit.iph_a ?? 0) <= 1e-12)) needs.push('a photocurrent of 0 A or less');
  if (fit.i0_a !== null && fit.i0_a <= 0) needs.push('a saturation current of 0 A or less');
  else if (at.has('i0_a')) needs.push((fit.i0_a ?? 0) > 1e-50 ? 'a saturation current as large as Isc' : 'a saturation current of practically 0 A');
  if (fit.rsh_ohm !== null && fit.rsh_ohm <= 0) needs.push('a shunt resistance of 0 Ω or less');
  if (needs.length) {
    flags.push({
      code: 'fit-parameter-impossible',
      severity: 'warn',
      message: `The single-diode fit stops at the edge of what is physical: it would need ${needs.join(' and ')}. Its parameters do not describe a real device.`,
    });
  }
  return flags;
}
