/**
 * The quantity columns of Quasilevel's CSV exports (the pass/fail list and the comparison): the
 * name of each column carries the unit of the value written in it (an entry of lib/vocabulary.ts),
 * FF and efficiency are written in % like the screens (`ff_pct`, `eff_pct`), and every value is
 * rounded to the precision stated here (README "Exports" lists it).
 *
 * The fixed decimals are chosen so that the smallest device measured, a single cell (Isc ≈ 0.76 A,
 * Voc ≈ 0.57 V, Pmax ≈ 0.31 W, Rs ≈ 0.036 Ω for the benchmark cell of
 * tests/fixtures/reference-data/README.md), still keeps three or more significant digits; a
 * module gets more digits than its measurement holds, which costs nothing. I0 and J0 span many
 * decades between devices, so they keep significant digits instead of decimals.
 */
import { QualityError } from '@/lib/quality/errors';
import type { ParamKey } from '@/lib/quality/params';
import { quantity } from '@/lib/vocabulary';

/** How a value is rounded: to fixed decimals, or to significant digits. */
export type ExportPrecision = { decimals: number } | { significant: number };

/** One quantity column: the engine's key it comes from, its name in the file, its precision. */
export type ExportColumn = { param: ParamKey; column: string; precision: ExportPrecision };

const dec = (decimals: number): ExportPrecision => ({ decimals });
const sig = (significant: number): ExportPrecision => ({ significant });

/** Every parameter's column, by the engine's key. */
export const EXPORT_COLUMNS: Readonly<Record<ParamKey, ExportColumn>> = {
  isc_a: { param: 'isc_a', column: 'isc_a', precision: dec(4) },
  voc_v: { param: 'voc_v', column: 'voc_v', precision: dec(4) },
  pmp_w: { param: 'pmp_w', column: 'pmp_w', precision: dec(4) },
  imp_a: { param: 'imp_a', column: 'imp_a', precision: dec(4) },
  vmp_v: { param: 'vmp_v', column: 'vmp_v', precision: dec(4) },
  // Stored as fractions (0.7135), written in % (71.35) with the key table's decimals for ff_pct, eff_pct.
  ff: { param: 'ff', column: 'ff_pct', precision: dec(2) },
  efficiency: { param: 'efficiency', column: 'eff_pct', precision: dec(2) },
  rsh0_ohm: { param: 'rsh0_ohm', column: 'rsh0_ohm', precision: dec(3) },
  rs0_ohm: { param: 'rs0_ohm', column: 'rs0_ohm', precision: dec(5) },
  iph_a: { param: 'iph_a', column: 'iph_a', precision: dec(4) },
  i0_a: { param: 'i0_a', column: 'i0_a', precision: sig(4) },
  // The ideality factor is dimensionless: its column is the one without a unit suffix.
  n: { param: 'n', column: 'n', precision: dec(3) },
  rs_ohm: { param: 'rs_ohm', column: 'rs_ohm', precision: dec(5) },
  rsh_ohm: { param: 'rsh_ohm', column: 'rsh_ohm', precision: dec(3) },
  rmse_a: { param: 'rmse_a', column: 'rmse_a', precision: dec(6) },
  j0_a_cm2: { param: 'j0_a_cm2', column: 'j0_a_cm2', precision: sig(4) },
  stc_pmp_w: { param: 'stc_pmp_w', column: 'stc_pmp_w', precision: dec(4) },
};

/** The column name of a parameter in the exports ("ff" → "ff_pct"). */
export function exportColumnName(param: ParamKey): string {
  return EXPORT_COLUMNS[param].column;
}

/** "4 decimals", "4 significant digits": the precision in words, for the README and tests. */
export function precisionText(p: ExportPrecision): string {
  return 'decimals' in p ? `${p.decimals} decimals` : `${p.significant} significant digits`;
}

/**
 * A stored value as the exports write it: in the column's unit (FF 0.71349 → 71.35) and rounded
 * to its precision; null for a missing value; a non-finite value is refused (the file would say
 * "NaN"). Returned as a number, so the CSV writer keeps it a number (never a formula-escaped text).
 */
export function exportValue(param: ParamKey, stored: number | null | undefined): number | null {
  if (stored == null) return null;
  if (typeof stored !== 'number' || !Number.isFinite(stored)) throw new QualityError(`${param} is ${stored}, not a finite number; it cannot be exported`);
  const shown = stored * (quantity(param)?.scale ?? 1);
  const p = EXPORT_COLUMNS[param].precision;
  const rounded = 'decimals' in p ? Number(shown.toFixed(p.decimals)) : Number(shown.toPrecision(p.significant));
  return rounded === 0 ? 0 : rounded; // no "-0"
}
