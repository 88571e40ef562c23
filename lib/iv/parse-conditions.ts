/**
 * Irradiance and temperature columns of an I-V table: each becomes the measurement's figure as
 * the mean over the sweep, and the irradiance's change during the sweep is kept
 * (`meta.irradiance_spread_pct`) for the flag in lib/iv/meta-flags.ts.
 */
import { IvInputError } from '@/lib/iv/errors';
import { clip, parseNumber } from '@/lib/iv/parse-cells';
import type { SideColumn } from '@/lib/iv/parse-header';
import type { CurveMeta } from '@/lib/iv/types';

/** The values of one side column read so far, with the first line for messages. */
export type SideValues = { col: SideColumn; sum: number; min: number; max: number; n: number };

export const sideValues = (col: SideColumn | null): SideValues | null => (col ? { col, sum: 0, min: Infinity, max: -Infinity, n: 0 } : null);

const RANGE = {
  g: { what: 'irradiance', low: 0, high: 5000, unit: 'W/m²', rule: 'above 0 and at most 5000 W/m²' },
  t: { what: 'temperature', low: -100, high: 250, unit: '°C', rule: 'between −100 °C and 250 °C' },
} as const;

/**
 * Adds the cell of one data row. An empty or missing cell is skipped (some instruments write the
 * irradiance on some rows only); text or a value outside the plausible range is an error naming the line.
 */
export function addSideValue(s: SideValues | null, kind: 'g' | 't', cells: readonly string[], decimalComma: boolean, lineNo: number): void {
  if (!s) return;
  const raw = cells[s.col.idx];
  if (raw === undefined || raw === '') return;
  const r = RANGE[kind];
  const x = parseNumber(raw, decimalComma, r.what, lineNo) * s.col.factor + s.col.offset;
  const inside = kind === 'g' ? x > r.low && x <= r.high : x > r.low && x < r.high;
  if (!inside) throw new IvInputError('bad-value', `the ${r.what} value "${clip(raw)}" in column "${clip(s.col.cell)}" is ${fmt(x)} ${r.unit}; it must lie ${r.rule}`, lineNo);
  s.sum += x;
  s.n++;
  if (x < s.min) s.min = x;
  if (x > s.max) s.max = x;
}

/** W/m² and °C to 0.1, as a flash log writes them. */
const fmt = (x: number) => Number(x.toFixed(1)).toString();

/**
 * Puts the columns' means into meta. A column wins over a metadata line (`fromLines`: the line
 * each field came from in the header block) and a note says so.
 * Spread = (max − min)/mean × 100 %. IEC 60904-9 calls (max − min)/(max + min) the temporal
 * instability of a simulator (IEC term 3.5.11, std.iec.ch terms database); with the mean near
 * (max + min)/2 this spread is about twice that figure.
 */
export function applySideColumns(meta: CurveMeta, g: SideValues | null, t: SideValues | null, fromLines: { irradiance?: number; temperature?: number }, notes: string[]): void {
  if (g && g.n > 0) {
    const mean = g.sum / g.n;
    const spread = ((g.max - g.min) / mean) * 100;
    if (fromLines.irradiance !== undefined && meta.irradiance_w_m2 !== undefined) {
      notes.push(`the irradiance column "${clip(g.col.cell)}" (mean ${fmt(mean)} W/m²) is used instead of the ${fmt(meta.irradiance_w_m2)} W/m² on line ${fromLines.irradiance}`);
    }
    meta.irradiance_w_m2 = mean;
    meta.irradiance_spread_pct = spread;
    notes.push(`irradiance ${fmt(mean)} W/m², the mean of column "${clip(g.col.cell)}" over ${g.n} points (from ${fmt(g.min)} to ${fmt(g.max)} W/m², a change of ${spread.toFixed(1)} % of the mean)`);
  } else if (g) notes.push(`column "${clip(g.col.cell)}" holds no irradiance values; not used`);
  if (t && t.n > 0) {
    const mean = t.sum / t.n;
    if (fromLines.temperature !== undefined && meta.temp_c !== undefined) {
      notes.push(`the temperature column "${clip(t.col.cell)}" (mean ${fmt(mean)} °C) is used instead of the ${fmt(meta.temp_c)} °C on line ${fromLines.temperature}`);
    }
    meta.temp_c = mean;
    notes.push(`temperature ${fmt(mean)} °C, the mean of column "${clip(t.col.cell)}" over ${t.n} points (from ${fmt(t.min)} to ${fmt(t.max)} °C)`);
  } else if (t) notes.push(`column "${clip(t.col.cell)}" holds no temperature values; not used`);
}
