/**
 * The comparison grid's columns: every key figure and fitted parameter, in the engine's names,
 * with the unit in each header. Pure data so the screen, the CSV export and tests share it.
 */
import { PARAM_LABELS, unitOf } from '@/lib/format';
import type { ParamKey } from '@/lib/quality/params';

export type CompareColumnId = 'deviceId' | 'batchName' | 'result' | 'powerClass' | 'outlier' | 'flags' | 'reasons' | ParamKey;

export const GRID_PARAMS: ParamKey[] = ['isc_a', 'voc_v', 'pmp_w', 'imp_a', 'vmp_v', 'ff', 'efficiency', 'iph_a', 'i0_a', 'j0_a_cm2', 'n', 'rs_ohm', 'rsh_ohm', 'rsh0_ohm', 'rs0_ohm', 'rmse_a', 'stc_pmp_w'];

export const DEFAULT_COLUMNS: CompareColumnId[] = ['deviceId', 'batchName', 'result', 'pmp_w', 'stc_pmp_w', 'voc_v', 'isc_a', 'ff', 'efficiency', 'iph_a', 'j0_a_cm2', 'n', 'rs_ohm', 'rsh_ohm', 'rmse_a', 'powerClass', 'flags'];

/** Header text with the unit as shown on screen (FF and efficiency in %). */
export function columnHeader(id: CompareColumnId): string {
  switch (id) {
    case 'deviceId':
      return 'Device';
    case 'batchName':
      return 'Batch';
    case 'result':
      return 'Pass/fail';
    case 'powerClass':
      return 'Class';
    case 'outlier':
      return 'Outlier';
    case 'flags':
      return 'Flags';
    case 'reasons':
      return 'Reasons';
    default: {
      const u = unitOf(id);
      return u ? `${PARAM_LABELS[id]} (${u})` : PARAM_LABELS[id];
    }
  }
}
