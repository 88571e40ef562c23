/** Request schemas for batches, uploads and refits, shared by the screens and the server. */
import { z } from 'zod';
import { optNumber, optNumberOrNull } from '@/lib/schemas/numbers';
import { optDate, optSafeText, safeText } from '@/lib/schemas/text';
import { withUnit } from '@/lib/schemas/unit-number';
import { labelWithUnit } from '@/lib/vocabulary';

/**
 * How a curve's STC figures were had (lib/analysis/stc.ts): measured within the tolerance of STC,
 * IEC 60891 procedure 1 on the measured curve, or the fitted single-diode model.
 */
export type StcMethod = 'measured' | 'iec60891-1' | 'model';

/** What a method used: the tolerance window, the coefficients and where they came from. */
export type StcInputs = {
  /** The window around 25 °C and 1000 W/m² taken as "at STC". */
  temp_tolerance_k: number;
  irradiance_tolerance_pct: number;
  /** Relative coefficients as given (batch), %/K. */
  alpha_pct_per_k?: number;
  beta_pct_per_k?: number;
  gamma_pct_per_k?: number;
  /** IEC 60891 procedure 1: absolute coefficients used, the internal series resistance, κ, Isc1. */
  alpha_a_per_k?: number;
  beta_v_per_k?: number;
  rs_ohm?: number;
  kappa_ohm_per_k?: number;
  isc1_a?: number;
  /** Model method: the model's own coefficients and the agreement asked for. */
  model_beta_pct_per_k?: number;
  model_gamma_pct_per_k?: number;
  agreement_tolerance_pct?: number;
  model_temp_window_k?: number;
  n?: number;
  /** Where the coefficients came from, in words ("the batch"). */
  coefficients_from?: string;
};

/** Figures of a curve at standard test conditions (1000 W/m², 25 °C), with the method that gave them. */
export type StcFigures = {
  method: StcMethod;
  /** The measurement's conditions (an assumed value is said in `notes`). */
  from: { irradiance_w_m2: number; temp_c: number };
  isc_a: number;
  voc_v: number;
  pmp_w: number;
  imp_a: number;
  vmp_v: number;
  ff: number;
  efficiency: number | null;
  /** The method and its inputs in words (absent on curves stored before methods were told apart). */
  basis?: string;
  inputs?: StcInputs;
  notes: string[];
};

/** No STC figures: no method holds for this curve; `reason` says why in words, `tried` each method's refusal. */
export type StcAbsent = {
  method: 'none';
  from: { irradiance_w_m2: number; temp_c: number };
  reason: string;
  tried: string[];
  notes: string[];
};

/** What a curve stores in `stc`: the figures or why there are none. */
export type StcOutcome = StcFigures | StcAbsent;

/** The STC figures of a stored outcome, or null when it has none (absent, or an older null). */
export function stcFiguresOf(stc: StcOutcome | null | undefined): StcFigures | null {
  if (!stc || stc.method === 'none' || typeof (stc as StcFigures).pmp_w !== 'number') return null;
  return stc;
}

/** Why a stored outcome has no STC figures, in words (lower case, to follow a colon); null when it has them. */
export function stcAbsentReason(stc: StcOutcome | null | undefined): string | null {
  if (!stc) return 'no STC figures were computed for this curve.';
  return stc.method === 'none' ? stc.reason : null;
}

/** The batch form's labels of the STC fields; the field errors name them the same way. */
export const BATCH_STC_LABELS = {
  irradiance_w_m2: 'Irradiance when a file does not say (W/m²)',
  alpha_pct_per_k: 'α, Isc temperature coefficient (%/K)',
  beta_pct_per_k: 'β, Voc temperature coefficient (%/K)',
  gamma_pct_per_k: 'γ, Pmax temperature coefficient (%/K)',
  rs_ohm: 'Rs for IEC 60891 (Ω)',
  kappa_ohm_per_k: 'κ, curve correction factor (Ω/K)',
} as const;

/**
 * A relative temperature coefficient of the batch, %/K, also typed as "%/°C" or "1/K". An absolute
 * one (mV/K, mA/K, W/K) is refused with the reason: turning it into %/K needs the module's own
 * value at 25 °C, which the batch does not hold.
 */
function relativeCoefficient(key: 'alpha_pct_per_k' | 'beta_pct_per_k' | 'gamma_pct_per_k', rule: { min: number; max: number }, of: string) {
  const label = BATCH_STC_LABELS[key];
  return withUnit(optNumberOrNull(label, rule), label, 'relative_per_k', 1, `An absolute coefficient needs the module's ${of} at 25 °C to become %/K; give it in %/K`);
}

export const batchFieldsSchema = z.object({
  product_type: optSafeText('Product type', { max: 120 }),
  supplier: optSafeText('Supplier', { max: 120 }),
  line: optSafeText('Line', { max: 60 }),
  lot: optSafeText('Lot', { max: 60 }),
  batch_date: optDate('Batch date'),
  // Named as the batch form labels them (the key table's label and unit). Numbers may carry a unit
  // ("244 cm²", "0.4 kW", "−0.35 %/K"), converted by mathjs (lib/units.ts) to the field's unit.
  cells: optNumberOrNull(labelWithUnit('cells'), { min: 1, max: 1000, integer: true }),
  area_cm2: withUnit(optNumberOrNull(labelWithUnit('area_cm2'), { min: 0.01, max: 100000 }), labelWithUnit('area_cm2'), 'area'),
  nameplate_w: withUnit(optNumberOrNull(labelWithUnit('nameplate_w'), { min: 0.001, max: 5000 }), labelWithUnit('nameplate_w'), 'power'),
  // For files that do not say, and for the STC figures (lib/analysis/stc.ts): the measurement
  // irradiance and the module type's coefficients (IEC 60891 procedure 1, the model's check).
  irradiance_w_m2: withUnit(optNumberOrNull(BATCH_STC_LABELS.irradiance_w_m2, { min: 1, max: 2000 }), BATCH_STC_LABELS.irradiance_w_m2, 'irradiance'),
  alpha_pct_per_k: relativeCoefficient('alpha_pct_per_k', { min: -1, max: 1 }, 'Isc'),
  beta_pct_per_k: relativeCoefficient('beta_pct_per_k', { min: -2, max: 0 }, 'Voc'),
  gamma_pct_per_k: relativeCoefficient('gamma_pct_per_k', { min: -2, max: 0 }, 'Pmax'),
  rs_ohm: withUnit(optNumberOrNull(BATCH_STC_LABELS.rs_ohm, { min: 0, max: 1000 }), BATCH_STC_LABELS.rs_ohm, 'resistance'),
  kappa_ohm_per_k: withUnit(optNumberOrNull(BATCH_STC_LABELS.kappa_ohm_per_k, { min: -1, max: 1 }), BATCH_STC_LABELS.kappa_ohm_per_k, 'resistance_per_k'),
  /** The measurement setup whose uncertainty budget the figures carry (null: the organisation's default). */
  setup_id: z.string().trim().min(1, 'setup_id: choose a measurement setup').max(64).nullable().optional(),
  description: optSafeText('Description', { max: 2000, multiline: true }),
});

export const batchCreateSchema = batchFieldsSchema.extend({
  name: safeText('Name', { min: 1, max: 120, missing: 'Give the batch a name.' }),
});
export type BatchCreateInput = z.input<typeof batchCreateSchema>;

export const batchUpdateSchema = batchFieldsSchema.partial().extend({
  name: safeText('Name', { min: 1, max: 120, missing: 'Give the batch a name.' }).optional(),
  archived: z.boolean().optional(),
});

/** GET /api/batches/:id/characterisation?device= — the device whose curves are characterised. */
export const characterisationQuerySchema = z.object({ device: z.string().min(1).max(120).optional() });

/** Form fields that may accompany an upload and override every file's metadata. */
export const uploadOverridesSchema = z.object({
  temp_c: withUnit(optNumberOrNull(labelWithUnit('temp_c'), { min: -60, max: 150 }), labelWithUnit('temp_c'), 'temperature'),
  irradiance_w_m2: withUnit(optNumberOrNull(labelWithUnit('irradiance_w_m2'), { min: 1, max: 2000 }), labelWithUnit('irradiance_w_m2'), 'irradiance'),
  cells: optNumberOrNull(labelWithUnit('cells'), { min: 1, max: 1000, integer: true }),
  area_cm2: withUnit(optNumberOrNull(labelWithUnit('area_cm2'), { min: 0.01, max: 100000 }), labelWithUnit('area_cm2'), 'area'),
  on_duplicate: z.enum(['ask', 'replace', 'keep']).optional().default('ask'),
});

export const refitSchema = z.object({
  model: z.enum(['single', 'double', 'both']).optional().default('both'),
  idealities: z.enum(['fixed', 'free']).optional().default('fixed'),
  objective: z.enum(['true-current', 'implicit']).optional().default('true-current'),
  temp_c: withUnit(optNumberOrNull(labelWithUnit('temp_c'), { min: -60, max: 150 }), labelWithUnit('temp_c'), 'temperature'),
  irradiance_w_m2: withUnit(optNumberOrNull(labelWithUnit('irradiance_w_m2'), { min: 1, max: 2000 }), labelWithUnit('irradiance_w_m2'), 'irradiance'),
  cells: optNumberOrNull(labelWithUnit('cells'), { min: 1, max: 1000, integer: true }),
  area_cm2: withUnit(optNumberOrNull(labelWithUnit('area_cm2'), { min: 0.01, max: 100000 }), labelWithUnit('area_cm2'), 'area'),
});
export type RefitInput = z.input<typeof refitSchema>;

/** Columns the batch table sorts by (server-side). */
export const CURVE_SORT_KEYS = ['device_id', 'isc_a', 'voc_v', 'pmp_w', 'ff', 'n', 'rs_ohm', 'rsh_ohm', 'stc_pmp_w', 'created_at'] as const;
export type CurveSortKey = (typeof CURVE_SORT_KEYS)[number];

export const curveListQuerySchema = z.object({
  page: optNumber('page', { min: 1, integer: true }).transform((v) => v ?? 1),
  page_size: optNumber('page_size', { min: 1, max: 500, integer: true }).transform((v) => v ?? 50),
  sort: z.enum(CURVE_SORT_KEYS).optional().default('device_id'),
  dir: z.enum(['asc', 'desc']).optional().default('asc'),
  q: z.string().trim().max(120).optional().default(''),
  flag: z.string().trim().max(60).optional(),
});
