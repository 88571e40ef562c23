/**
 * String sizing: the request schema shared by the /strings form and POST /api/strings/size, and
 * the answer's shape. The schema only checks that numbers are numbers and that the request hangs
 * together; the physical limits (temperatures within −60…+100 °C, a limit above one module's
 * cold Voc, …) are lib/strings' and come back as its messages, so there is one set of rules.
 */
import { z } from 'zod';
import { optNumber, reqNumber } from '@/lib/schemas/numbers';
import { labelOf } from '@/lib/vocabulary';
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
    batchId: optId,
    curveId: optId,
    vocStc_V: optNumber('Voc at STC (V)'),
    betaVoc_pct_per_K: optNumber('Voc coefficient (%/K)'),
    tMin_C: reqNumber('Record low temperature (°C)', {}, 'Enter the site’s record low ambient temperature in °C.'),
    tCellMax_C: optNumber('Hottest cell temperature (°C)'),
    vSys_V: reqNumber('System voltage limit (V)', {}, 'Enter the system voltage limit in V DC (1000, 1500 or another rating).'),
    mppWindow: z
      .object({ min_V: optNumber('MPP window minimum (V)'), max_V: optNumber('MPP window maximum (V)') })
      .optional()
      .nullable(),
    vmpStc_V: optNumber('Vmp at STC (V)'),
    betaVmp_pct_per_K: optNumber('Vmp coefficient (%/K)'),
  })
  .transform((v, ctx) => {
    if (v.batchId && v.curveId) {
      ctx.addIssue({ code: 'custom', path: ['curveId'], message: 'Give a batch or one curve, not both.' });
      return z.NEVER;
    }
    const lo = v.mppWindow?.min_V;
    const hi = v.mppWindow?.max_V;
    if ((lo === undefined) !== (hi === undefined)) {
      ctx.addIssue({ code: 'custom', path: ['mppWindow', lo === undefined ? 'min_V' : 'max_V'], message: 'Give both ends of the MPP window, or neither.' });
      return z.NEVER;
    }
    const { mppWindow: _window, ...rest } = v;
    return { ...rest, mppWindow: lo === undefined || hi === undefined ? undefined : { min_V: lo, max_V: hi } };
  });

/** The request's field names as the /strings form labels them (quantities from the key table). */
export const STRING_FIELD_LABELS: Record<string, string> = {
  ...Object.fromEntries(
    ['vocStc_V', 'betaVoc_pct_per_K', 'tMin_C', 'tCellMax_C', 'vSys_V', 'mppWindow.min_V', 'mppWindow.max_V', 'vmpStc_V', 'betaVmp_pct_per_K'].map((k) => [k, labelOf(k)]),
  ),
  mppWindow: 'MPP window',
  batchId: 'Batch',
  curveId: 'Curve',
};

/**
 * A sizing message for people reading the form: the API's field names (tMin_C, …) become the
 * form's labels. The API itself keeps the field names, which is what a script needs.
 */
export function sizingMessageForForm(message: string): string {
  const names = Object.keys(STRING_FIELD_LABELS).sort((a, b) => b.length - a.length);
  const pattern = new RegExp(`\\b(${names.map((n) => n.replace('.', '\\.')).join('|')})\\b`, 'g');
  return message.replace(pattern, (m) => STRING_FIELD_LABELS[m] ?? m);
}

/** What a form or a client sends (numbers or their text). */
export type StringSizeInput = z.input<typeof stringSizeSchema>;
/** The request after parsing: numbers, undefined where not given. */
export type StringSizeRequest = z.output<typeof stringSizeSchema>;

/** A point of the measured Voc(T) line: the mean Voc of the curves at one cell temperature. */
export type MeasuredPoint = { tempC: number; voc_V: number; curves: number };

/** Where a temperature coefficient came from. */
export type CoefficientSource =
  | { kind: 'entered' }
  | {
      kind: 'measured';
      /** The points the straight line went through. */
      points: MeasuredPoint[];
      span_K: number;
      r2: number;
      rule: string;
      warnings: string[];
    }
  | {
      kind: 'model';
      /** Temperature law of I0 used (lib/physics vocTempCoefficient). */
      law: 'ni-power';
      lawText: string;
      deviceId: string;
      curveId: string;
      fitTempC: number;
      cells: number;
      /** Why no measured coefficient was used, when the batch had curves at several temperatures. */
      note: string | null;
    };

/** Where the module's STC voltages came from. */
export type ModuleSource =
  | { kind: 'entered' }
  | {
      kind: 'batch' | 'curve';
      deviceId: string;
      curveId: string;
      /** The value used, V. */
      value_V: number;
      /** Curves with STC figures that were compared. */
      modules: number;
      /** Their mean, V (to show how far the worst case is from it). */
      mean_V: number;
      note: string;
    };

/** POST /api/strings/size answer: lib/strings' sizeString result (rounded) and where each input came from. */
export type StringSizeResponse = StringSizingResult & {
  /** The values the sizing used, after the batch's were filled in and the request's applied. */
  inputs: {
    vocStc_V: number;
    betaVoc_pct_per_K: number;
    tMin_C: number;
    tCellMax_C: number | null;
    vSys_V: number;
    vmpStc_V: number | null;
    betaVmp_pct_per_K: number | null;
    mppWindow: { min_V: number; max_V: number } | null;
  };
  source: {
    batch: { id: string; name: string } | null;
    /** The module the sizing is based on: the batch's highest Voc at STC (worst case), or entered. */
    module: ModuleSource;
    betaVoc: CoefficientSource;
    /** Vmp at STC: the batch's lowest (the worst case for the MPP window's minimum), or entered. */
    vmpStc: ModuleSource | null;
    betaVmp: CoefficientSource | null;
  };
  /** HV_CAUTION.short: the caution travels with the numbers. */
  caution: string;
};
