/**
 * String sizing: the request schema shared by the /strings form and POST /api/strings/size, and
 * the answer's shape. The schema only checks that numbers are numbers and that the request hangs
 * together; the physical limits (temperatures within −60…+100 °C, a limit above one module's
 * cold Voc, …) are lib/strings' and come back as its messages, so there is one set of rules.
 */
import { z } from 'zod';
import { optNumber, reqNumber } from '@/lib/schemas/numbers';
import { formatValue, labelOf, labelWithUnit } from '@/lib/vocabulary';
import type { StringSizingResult } from '@/lib/strings/size-string';

/**
 * When the Voc coefficient counts as measured: the batch has curves at two or more cell
 * temperatures spanning at least this many kelvin. Below it the spread of the devices and of the
 * temperature readings swamps a slope of ≈ −0.1 V/K per module.
 */
export const MEASURED_MIN_SPAN_K = 5;

const optId = z
  .string()
  .trim()
  .max(100)
  .optional()
  .nullable()
  .transform((v) => (v ? v : undefined));

export const stringSizeSchema = z
  .object({
    batch_id: optId,
    curve_id: optId,
    // Named as the form labels them (the key table's label and unit).
    voc_stc_v: optNumber(labelWithUnit('voc_stc_v')),
    beta_voc_pct_per_k: optNumber(labelWithUnit('beta_voc_pct_per_k')),
    t_min_c: reqNumber(labelWithUnit('t_min_c'), {}, 'Enter the site’s record low ambient temperature in °C.'),
    t_cell_max_c: optNumber(labelWithUnit('t_cell_max_c')),
    v_sys_v: reqNumber(labelWithUnit('v_sys_v'), {}, 'Enter the system voltage limit in V DC (1000, 1500 or another rating).'),
    mpp_window_min_v: optNumber(labelWithUnit('mpp_window_min_v')),
    mpp_window_max_v: optNumber(labelWithUnit('mpp_window_max_v')),
    vmp_stc_v: optNumber(labelWithUnit('vmp_stc_v')),
    beta_vmp_pct_per_k: optNumber(labelWithUnit('beta_vmp_pct_per_k')),
  })
  .transform((v, ctx) => {
    if (v.batch_id && v.curve_id) {
      ctx.addIssue({ code: 'custom', path: ['curve_id'], message: 'Give a batch or one curve, not both.' });
      return z.NEVER;
    }
    if ((v.mpp_window_min_v === undefined) !== (v.mpp_window_max_v === undefined)) {
      ctx.addIssue({ code: 'custom', path: [v.mpp_window_min_v === undefined ? 'mpp_window_min_v' : 'mpp_window_max_v'], message: 'Give both ends of the MPP window, or neither.' });
      return z.NEVER;
    }
    // "From … to …" the right way round, said at the "to" field.
    if (v.mpp_window_min_v !== undefined && v.mpp_window_max_v !== undefined && !(v.mpp_window_max_v > v.mpp_window_min_v)) {
      ctx.addIssue({ code: 'custom', path: ['mpp_window_max_v'], message: `${labelWithUnit('mpp_window_max_v')} must be above ${labelOf('mpp_window_min_v')} (${formatValue('mpp_window_min_v', v.mpp_window_min_v, 6)}).` });
      return z.NEVER;
    }
    if (v.t_cell_max_c !== undefined && v.t_cell_max_c < v.t_min_c) {
      ctx.addIssue({ code: 'custom', path: ['t_cell_max_c'], message: `${labelWithUnit('t_cell_max_c')} must not be below the ${labelOf('t_min_c').toLowerCase()} (${formatValue('t_min_c', v.t_min_c, 6)}).` });
      return z.NEVER;
    }
    return v;
  });

/** The request's field names as the /strings form labels them (quantities from the key table). */
export const STRING_FIELD_LABELS: Record<string, string> = {
  ...Object.fromEntries(
    ['voc_stc_v', 'beta_voc_pct_per_k', 't_min_c', 't_cell_max_c', 'v_sys_v', 'mpp_window_min_v', 'mpp_window_max_v', 'vmp_stc_v', 'beta_vmp_pct_per_k'].map((k) => [k, labelOf(k)]),
  ),
  batch_id: 'Batch',
  curve_id: 'Curve',
};

/**
 * The form field a sizing message is about: the first request key it names ("t_cell_max_c (70 °C)
 * is below t_min_c …" → t_cell_max_c), or null when it names none.
 */
export function sizingFieldOf(message: string): keyof StringSizeInput | null {
  const names = Object.keys(STRING_FIELD_LABELS).sort((a, b) => b.length - a.length);
  const m = new RegExp(`\\b(${names.join('|')})\\b`).exec(message);
  return m ? (m[1] as keyof StringSizeInput) : null;
}

/**
 * A sizing message for people reading the form: the API's field names (t_min_c, …) become the
 * form's labels. The API itself keeps the field names, which is what a script needs.
 */
export function sizingMessageForForm(message: string): string {
  const names = Object.keys(STRING_FIELD_LABELS).sort((a, b) => b.length - a.length);
  const pattern = new RegExp(`\\b(${names.join('|')})\\b`, 'g');
  return message.replace(pattern, (m) => STRING_FIELD_LABELS[m] ?? m);
}

/** What a form or a client sends (numbers or their text). */
export type StringSizeInput = z.input<typeof stringSizeSchema>;
/** The request after parsing: numbers, undefined where not given. */
export type StringSizeRequest = z.output<typeof stringSizeSchema>;

/** A point of the measured Voc(T) line: the mean Voc of the curves at one cell temperature. */
export type MeasuredPoint = { temp_c: number; voc_v: number; curves: number };

/** Where a temperature coefficient came from. */
export type CoefficientSource =
  | { kind: 'entered' }
  | {
      kind: 'measured';
      /** The points the straight line went through. */
      points: MeasuredPoint[];
      span_k: number;
      r2: number;
      rule: string;
      warnings: string[];
    }
  | {
      kind: 'model';
      /** Temperature law of I0 used (lib/physics vocTempCoefficient). */
      law: 'ni-power';
      law_text: string;
      device_id: string;
      curve_id: string;
      fit_temp_c: number;
      cells: number;
      /** Why no measured coefficient was used, when the batch had curves at several temperatures. */
      note: string | null;
    };

/** Where the module's STC voltages came from. */
export type ModuleSource =
  | { kind: 'entered' }
  | {
      kind: 'batch' | 'curve';
      device_id: string;
      curve_id: string;
      /** The value used, V. */
      value_v: number;
      /** Curves with STC figures that were compared. */
      modules: number;
      /** Their mean, V (to show how far the worst case is from it). */
      mean_v: number;
      note: string;
    };

/** POST /api/strings/size answer: lib/strings' sizeString result (rounded) and where each input came from. */
export type StringSizeResponse = StringSizingResult & {
  /** The values the sizing used, after the batch's were filled in and the request's applied. */
  inputs: {
    voc_stc_v: number;
    beta_voc_pct_per_k: number;
    t_min_c: number;
    t_cell_max_c: number | null;
    v_sys_v: number;
    vmp_stc_v: number | null;
    beta_vmp_pct_per_k: number | null;
    mpp_window_min_v: number | null;
    mpp_window_max_v: number | null;
  };
  source: {
    batch: { id: string; name: string } | null;
    /** The module the sizing is based on: the batch's highest Voc at STC (worst case), or entered. */
    module: ModuleSource;
    beta_voc: CoefficientSource;
    /** Vmp at STC: the batch's lowest (the worst case for the MPP window's minimum), or entered. */
    vmp_stc: ModuleSource | null;
    beta_vmp: CoefficientSource | null;
  };
  /** HV_CAUTION.short: the caution travels with the numbers. */
  caution: string;
};
