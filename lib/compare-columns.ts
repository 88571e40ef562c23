/**
 * The comparison grid's columns: every key figure and fitted parameter, in the engine's names,
 * with the unit in each header (from the key table, lib/vocabulary.ts). Pure data so the
 * screen, the CSV export and tests share it.
 */
import type { ParamKey } from '@/lib/quality/params';
import { labelWithUnit } from '@/lib/vocabulary';

export type CompareColumnId = 'device_id' | 'batch_name' | 'result' | 'power_class' | 'outlier' | 'flags' | 'reasons' | ParamKey;

export const GRID_PARAMS: ParamKey[] = ['isc_a', 'voc_v', 'pmp_w', 'imp_a', 'vmp_v', 'ff', 'efficiency', 'iph_a', 'i0_a', 'j0_a_cm2', 'n', 'rs_ohm', 'rsh_ohm', 'rsh0_ohm', 'rs0_ohm', 'rmse_a', 'stc_pmp_w'];

export const DEFAULT_COLUMNS: CompareColumnId[] = ['device_id', 'batch_name', 'result', 'pmp_w', 'stc_pmp_w', 'voc_v', 'isc_a', 'ff', 'efficiency', 'iph_a', 'j0_a_cm2', 'n', 'rs_ohm', 'rsh_ohm', 'rmse_a', 'power_class', 'flags'];

/** Header text with the unit as shown on screen (FF and efficiency in %). */
export function columnHeader(id: CompareColumnId): string {
  switch (id) {
    case 'device_id':
      return 'Device';
    case 'batch_name':
      return 'Batch';
    case 'result':
      return 'Pass/fail';
    case 'power_class':
      return 'Class';
    case 'outlier':
      return 'Outlier';
    case 'flags':
      return 'Flags';
    case 'reasons':
      return 'Reasons';
    default:
      return labelWithUnit(id);
  }
}

/** Every column the grid can show, in the chooser's order (the comparison CSV of the API writes them all). */
export const ALL_COLUMNS: CompareColumnId[] = ['device_id', 'batch_name', 'result', 'power_class', 'outlier', ...GRID_PARAMS, 'flags', 'reasons'];
