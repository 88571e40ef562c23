/**
 * Request schemas of the device-physics API, shared by the /physics screen and the server.
 * Only the shape and the numbers' readability are checked here; the physical ranges (model
 * temperature range, dopant solubility, translation limits) are the physics library's, which
 * answers with a PhysicsError naming the input.
 */
import { z } from 'zod';
import { optNumber, reqNumber } from '@/lib/schemas/numbers';
import { labelOf, labelWithUnit, unitOf } from '@/lib/vocabulary';
import { withUnit } from '@/lib/schemas/unit-number';
import type { Quantity } from '@/lib/units';

/** The unit family of each coefficient a person may type with a unit, and the factor to the field's unit. */
const COEFFICIENT_QUANTITY: Record<string, [Quantity, number]> = {
  alpha_a_per_k: ['current_per_k', 1],
  alpha_isc_a_per_k: ['current_per_k', 1],
  beta_v_per_k: ['voltage_per_k', 1],
  alpha_rel_per_k: ['relative_per_k', 0.01],
  beta_rel_per_k: ['relative_per_k', 0.01],
  rs_ohm: ['resistance', 1],
  kappa_ohm_per_k: ['resistance_per_k', 1],
};

/** A required number; its messages name it as the forms label it, from the key table: "Doping (cm⁻³) must be a number." */
const requiredNumber = (key: string, label = labelWithUnit(key)) => reqNumber(label);

/** An optional number (undefined when left empty), named like requiredNumber. */
const optionalNumber = (key: string, label = labelWithUnit(key)) => optNumber(label);

/**
 * A "from … to …" range of a chart: each end a number, `from` below `to` (an error at the "To"
 * field otherwise), defaults when left empty. Where the ends may lie is the physics library's
 * check (the model's temperature range).
 */
function rangeFields<F extends string, T extends string>(from: F, to: T, unit: string, defaults: { from: number; to: number }) {
  const fromLabel = `From (${unit})`;
  const toLabel = `To (${unit})`;
  return {
    shape: { [from]: optNumber(fromLabel), [to]: optNumber(toLabel) } as Record<F | T, ReturnType<typeof optNumber>>,
    check: (v: Record<F | T, number | undefined>, ctx: z.RefinementCtx) => {
      const a = v[from] ?? defaults.from;
      const b = v[to] ?? defaults.to;
      if (!(b > a)) ctx.addIssue({ code: 'custom', path: [to], message: `${toLabel} must be above From (${a} ${unit}).` });
    },
    fill: (v: Record<F | T, number | undefined>) => ({ [from]: v[from] ?? defaults.from, [to]: v[to] ?? defaults.to }) as Record<F | T, number>,
  };
}

/** The temperatures of the n_i chart, K (the default 200–400 K). */
export const NI_RANGE_K = { from: 200, to: 400 };
const niRange = rangeFields('from_k', 'to_k', 'K', NI_RANGE_K);

/** GET /api/physics/material?temp_k=&from_k=&to_k= (300 K, and n_i over 200–400 K, when omitted). */
export const materialQuerySchema = z
  .object({ temp_k: optionalNumber('temp_k'), ...niRange.shape })
  .superRefine((v, ctx) => niRange.check(v, ctx))
  .transform((v) => ({ temp_k: v.temp_k ?? 300, ...niRange.fill(v) }));
export type MaterialQuery = z.output<typeof materialQuerySchema>;

/** Cell temperatures of the Voc-against-temperature chart, °C (the default −40…+85 °C). */
export const VOC_RANGE_C = { from: -40, to: 85 };
const vocRange = rangeFields('from_c', 'to_c', '°C', VOC_RANGE_C);

/** GET /api/physics/curves/:id?from_c=&to_c=: the range of the Voc chart. */
export const curvePhysicsQuerySchema = z
  .object(vocRange.shape)
  .superRefine((v, ctx) => vocRange.check(v, ctx))
  .transform((v) => vocRange.fill(v));
export type CurvePhysicsQuery = z.output<typeof curvePhysicsQuerySchema>;

export const DOPING_TYPES = ['p', 'n'] as const;

/**
 * POST /api/physics/band-diagram: doping, temperature and an injection given either as the
 * excess density or as a generation rate with a lifetime (Δn = G·τ).
 */
export const bandDiagramSchema = z.object({
  type: z.enum(DOPING_TYPES, { message: 'type must be "p" or "n".' }),
  doping_cm3: requiredNumber('doping_cm3'),
  excess_cm3: optionalNumber('excess_cm3'),
  generation_cm3_s: optionalNumber('generation_cm3_s'),
  lifetime_s: optionalNumber('lifetime_s'),
  temp_k: requiredNumber('temp_k'),
});
export type BandDiagramInput = z.input<typeof bandDiagramSchema>;
export type BandDiagramRequest = z.output<typeof bandDiagramSchema>;

export const TRANSLATION_METHODS = ['model', 'iec60891-1', 'iec60891-2'] as const;
export type TranslationMethod = (typeof TRANSLATION_METHODS)[number];

export const TRANSLATION_METHOD_LABELS: Record<TranslationMethod, string> = {
  model: 'Fitted model (De Soto 2006)',
  'iec60891-1': 'IEC 60891 procedure 1',
  'iec60891-2': 'IEC 60891 procedure 2',
};

const COEFFICIENT_KEYS = ['alpha_a_per_k', 'beta_v_per_k', 'alpha_rel_per_k', 'beta_rel_per_k', 'rs_ohm', 'kappa_ohm_per_k', 'a_irradiance', 'alpha_isc_a_per_k'] as const;

/**
 * Every coefficient a translation may take, with its label and unit for forms (from the key
 * table). IEC 60891 calls Rs the internal series resistance, which the form says.
 */
export const TRANSLATION_COEFFICIENTS = Object.fromEntries(
  COEFFICIENT_KEYS.map((k) => [k, { label: k === 'rs_ohm' ? 'Rs, internal series resistance' : labelOf(k), unit: unitOf(k) || 'dimensionless' }]),
) as Record<(typeof COEFFICIENT_KEYS)[number], { label: string; unit: string }>;
export type TranslationCoefficient = keyof typeof TRANSLATION_COEFFICIENTS;

/** A coefficient's form label: "κ, curve correction factor (Ω/K)". */
export const coefficientLabel = (k: TranslationCoefficient) => `${TRANSLATION_COEFFICIENTS[k].label} (${TRANSLATION_COEFFICIENTS[k].unit})`;

/** Coefficients each method uses; `required` ones must be given. */
export const METHOD_COEFFICIENTS: Record<TranslationMethod, { required: TranslationCoefficient[]; optional: TranslationCoefficient[] }> = {
  'iec60891-1': { required: ['alpha_a_per_k', 'beta_v_per_k', 'rs_ohm', 'kappa_ohm_per_k'], optional: [] },
  'iec60891-2': { required: ['alpha_rel_per_k', 'beta_rel_per_k', 'rs_ohm', 'kappa_ohm_per_k', 'a_irradiance'], optional: [] },
  model: { required: [], optional: ['alpha_isc_a_per_k'] },
};

const coefficientFields = Object.fromEntries(
  (Object.keys(TRANSLATION_COEFFICIENTS) as TranslationCoefficient[]).map((k) => {
    const field = optionalNumber(k, coefficientLabel(k));
    const q = COEFFICIENT_QUANTITY[k];
    return [k, q ? withUnit(field, k, q[0], q[1]) : field];
  }),
) as { [K in TranslationCoefficient]: ReturnType<typeof optionalNumber> };

/**
 * POST /api/physics/curves/:id/translate: the method, the target conditions and the method's
 * coefficients. Every missing coefficient of the chosen method is reported, each by name.
 */
export const translateSchema = z
  .object({
    method: z.enum(TRANSLATION_METHODS, { message: 'method must be model, iec60891-1 or iec60891-2.' }),
    to: z.object(
      {
        irradiance_w_m2: withUnit(requiredNumber('irradiance_w_m2', 'Target irradiance (W/m²)'), 'Target irradiance', 'irradiance'),
        temp_c: withUnit(requiredNumber('temp_c', 'Target cell temperature (°C)'), 'Target cell temperature', 'temperature'),
      },
      { message: 'Give the target irradiance (W/m²) and cell temperature (°C).' },
    ),
    i0_law: z.enum(['desoto', 'ni-power']).optional(),
    ...coefficientFields,
  })
  .superRefine((v, ctx) => {
    for (const k of METHOD_COEFFICIENTS[v.method].required) {
      if (v[k] === undefined) {
        const c = TRANSLATION_COEFFICIENTS[k];
        ctx.addIssue({ code: 'custom', path: [k], message: `${TRANSLATION_METHOD_LABELS[v.method]} needs ${c.label} (${c.unit}), which is missing.` });
      }
    }
  });
export type TranslateInput = z.input<typeof translateSchema>;
export type TranslateRequest = z.output<typeof translateSchema>;
