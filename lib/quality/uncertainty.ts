/**
 * Measurement uncertainty of a measurement setup (its budget) and of each device's figures,
 * following the GUM (JCGM 100:2008):
 *  - each component's standard uncertainty: a normal component given as an expanded
 *    uncertainty U with its coverage factor k has u = U / k (GUM 4.3.3); a rectangular component
 *    given as its half-width a has u = a / √3 (GUM 4.3.7);
 *  - each component acts on Pmax, Isc or Voc directly (in % of the figure), or on an input
 *    quantity (irradiance in %, temperature in K) whose effect is its sensitivity coefficient
 *    times u (GUM 5.1.3, c_i = ∂f/∂x_i, here in relative terms);
 *  - the components are taken as uncorrelated: u_c² = Σ (c_i·u_i)² (GUM 5.1.2);
 *  - the expanded uncertainty is U = k·u_c with k = 2 (GUM 6.2, about 95 % coverage for a
 *    near-normal result).
 *
 * Sensitivities used (relative, %/% or %/K):
 *  - irradiance → Pmax 1 %/% and Isc 1 %/% (both proportional to irradiance near STC, IEC 60891
 *    procedure 1's Isc·G_STC/G);
 *  - irradiance → Voc 0.05 %/%: Voc ≈ n·Ns·(kT/q)·ln(Isc/I0) gives dVoc/Voc = (n·kT/q)/Voc_cell ·
 *    dG/G; with n ≈ 1.2, kT/q = 25.7 mV at 25 °C and Voc ≈ 0.65 V per crystalline-silicon cell
 *    this is 0.047, taken as 0.05 (values from memory, stated here so a reader can judge);
 *  - temperature → |α| on Isc, |β| on Voc, |γ| on Pmax, the batch's own coefficients; where the
 *    batch has none, typical crystalline-silicon datasheet values α = +0.05, β = −0.30,
 *    γ = −0.40 %/K (common practice; memory).
 * STC Pmax takes Pmax's relative uncertainty (the translation's own uncertainty is not in the
 * budget; add it as a Pmax component when it matters).
 */
import { z } from 'zod';
import type { ParamKey } from '@/lib/quality/params';
import { textProblem } from '@/lib/schemas/text';
import { formatValue as formatVocabulary, unitOf } from '@/lib/vocabulary';

/** What a component acts on: a figure directly (in %), or an input quantity (irradiance %, temperature K). */
export const ACTS_ON = ['pmp', 'isc', 'voc', 'irradiance', 'temperature'] as const;
export type ActsOn = (typeof ACTS_ON)[number];
export const DISTRIBUTIONS = ['normal', 'rectangular'] as const;
export const COMPONENT_UNITS = ['%', 'K'] as const;

/** The unit each `acts_on` is given in. */
export const UNIT_OF: Record<ActsOn, (typeof COMPONENT_UNITS)[number]> = { pmp: '%', isc: '%', voc: '%', irradiance: '%', temperature: 'K' };

/** In words, for the screens and messages. */
export const ACTS_ON_WORDS: Record<ActsOn, string> = {
  pmp: 'Pmax directly',
  isc: 'Isc directly',
  voc: 'Voc directly',
  irradiance: 'irradiance',
  temperature: 'cell temperature',
};

const safeName = (what: string, max: number) =>
  z
    .string({ error: `${what} is required` })
    .trim()
    .min(1, `${what} is required`)
    .max(max, `${what} is at most ${max} characters`)
    .refine((v) => !textProblem(v, { max: Number.POSITIVE_INFINITY }), `${what} contains a control character`);

export const componentSchema = z
  .strictObject({
    name: safeName('name', 120),
    acts_on: z.enum(ACTS_ON, { error: `acts_on must be one of ${ACTS_ON.join(', ')}` }),
    value: z.number({ error: 'value must be a finite number' }).min(0, 'value must be ≥ 0').max(1000, 'value must be at most 1000'),
    unit: z.enum(COMPONENT_UNITS, { error: 'unit must be "%" or "K"' }),
    distribution: z.enum(DISTRIBUTIONS, { error: 'distribution must be "normal" or "rectangular"' }),
    k: z.number({ error: 'k must be a finite number' }).min(1, 'k must be at least 1').max(10, 'k must be at most 10').optional(),
  })
  .superRefine((c, ctx) => {
    if (c.unit !== UNIT_OF[c.acts_on]) {
      ctx.addIssue({ code: 'custom', path: ['unit'], message: `a component acting on ${ACTS_ON_WORDS[c.acts_on]} is given in ${UNIT_OF[c.acts_on]}, not ${c.unit}` });
    }
    if (c.distribution === 'normal' && c.k === undefined) {
      ctx.addIssue({ code: 'custom', path: ['k'], message: 'a normal component needs its coverage factor k (2 for a calibration certificate at about 95 %)' });
    }
    if (c.distribution === 'rectangular' && c.k !== undefined) {
      ctx.addIssue({ code: 'custom', path: ['k'], message: 'a rectangular component is given by its half-width; leave k out' });
    }
  });

export type UncertaintyComponent = z.output<typeof componentSchema>;

/** The input of a measurement setup (API body and form). */
export const setupInputSchema = z.strictObject({
  name: safeName('name', 120),
  components: z.array(componentSchema).max(50, 'at most 50 components').default([]),
  is_default: z.boolean().optional(),
});
export const setupPatchSchema = z.strictObject({
  name: safeName('name', 120).optional(),
  components: z.array(componentSchema).max(50, 'at most 50 components').optional(),
  is_default: z.literal(true, { error: 'is_default can only be set to true (make another setup the default to change it)' }).optional(),
});
export type SetupInput = z.input<typeof setupInputSchema>;

/** Temperature coefficients in %/K (null where unknown). */
export type TempCoefficients = { alpha_pct_per_k: number | null; beta_pct_per_k: number | null; gamma_pct_per_k: number | null };

/** Typical crystalline-silicon coefficients (common practice; memory), used where a batch has none. */
export const TYPICAL_COEFFICIENTS = { alpha_pct_per_k: 0.05, beta_pct_per_k: -0.3, gamma_pct_per_k: -0.4 } as const;

/** Relative sensitivity of Voc to irradiance, %/% (see the header). */
export const VOC_IRRADIANCE_SENSITIVITY = 0.05;

/** The coverage factor of every expanded uncertainty Quasilevel states. */
export const COVERAGE_K = 2;

/** A component's standard uncertainty in its own unit (GUM 4.3.3 normal: U/k; 4.3.7 rectangular: a/√3). */
export function standardUncertainty(c: Pick<UncertaintyComponent, 'value' | 'distribution' | 'k'>): number {
  return c.distribution === 'normal' ? c.value / (c.k ?? COVERAGE_K) : c.value / Math.sqrt(3);
}

export type Figure = 'pmp' | 'isc' | 'voc';
export const FIGURES: readonly Figure[] = ['pmp', 'isc', 'voc'];

/** Sensitivity c of a figure to what the component acts on, in %/% or %/K (absolute value: only c² counts). */
export function sensitivity(actsOn: ActsOn, figure: Figure, coeff: TempCoefficients): number {
  if (actsOn === figure) return 1;
  if (actsOn === 'irradiance') return figure === 'voc' ? VOC_IRRADIANCE_SENSITIVITY : 1;
  if (actsOn === 'temperature') {
    const c = {
      isc: coeff.alpha_pct_per_k ?? TYPICAL_COEFFICIENTS.alpha_pct_per_k,
      voc: coeff.beta_pct_per_k ?? TYPICAL_COEFFICIENTS.beta_pct_per_k,
      pmp: coeff.gamma_pct_per_k ?? TYPICAL_COEFFICIENTS.gamma_pct_per_k,
    }[figure];
    return Math.abs(c);
  }
  return 0; // a component on another figure directly
}

/** The expanded (k = 2) relative uncertainties of Pmax, Isc and Voc, in %. */
export type Budget = { u_pmp_pct_k2: number; u_isc_pct_k2: number; u_voc_pct_k2: number };

/** Combines the components (uncorrelated, GUM 5.1.2) into each figure's expanded uncertainty, k = 2. */
export function combineBudget(components: readonly UncertaintyComponent[], coeff: TempCoefficients = { alpha_pct_per_k: null, beta_pct_per_k: null, gamma_pct_per_k: null }): Budget {
  const sumSq: Record<Figure, number> = { pmp: 0, isc: 0, voc: 0 };
  for (const c of components) {
    const u = standardUncertainty(c);
    for (const f of FIGURES) sumSq[f] += (sensitivity(c.acts_on, f, coeff) * u) ** 2;
  }
  return {
    u_pmp_pct_k2: COVERAGE_K * Math.sqrt(sumSq.pmp),
    u_isc_pct_k2: COVERAGE_K * Math.sqrt(sumSq.isc),
    u_voc_pct_k2: COVERAGE_K * Math.sqrt(sumSq.voc),
  };
}

/** The parameters that carry an uncertainty, and the budget figure each takes. */
export const UNCERTAIN_PARAMS: readonly { param: ParamKey; figure: keyof Budget; key: string }[] = [
  { param: 'pmp_w', figure: 'u_pmp_pct_k2', key: 'u_pmp_w' },
  { param: 'isc_a', figure: 'u_isc_pct_k2', key: 'u_isc_a' },
  { param: 'voc_v', figure: 'u_voc_pct_k2', key: 'u_voc_v' },
  { param: 'stc_pmp_w', figure: 'u_pmp_pct_k2', key: 'u_stc_pmp_w' },
];

/** The key of a parameter's expanded uncertainty ("pmp_w" → "u_pmp_w"), or null when none is carried. */
export function uncertaintyKey(param: ParamKey): string | null {
  return UNCERTAIN_PARAMS.find((p) => p.param === param)?.key ?? null;
}

/** The expanded uncertainties (k = 2) of one device's figures, in their units; absent where the value is. */
export function deviceUncertainty(values: Partial<Record<ParamKey, number | null>>, budget: Budget | null): Partial<Record<ParamKey, number>> {
  const out: Partial<Record<ParamKey, number>> = {};
  if (!budget) return out;
  for (const p of UNCERTAIN_PARAMS) {
    const v = values[p.param];
    if (typeof v === 'number' && Number.isFinite(v)) out[p.param] = (Math.abs(v) * budget[p.figure]) / 100;
  }
  return out;
}

/** Rounds U to two significant digits (GUM 7.2.6) and the value to the same decimals: (287.04, 8.812) → "287.0 ± 8.8". */
export function valuePlusMinus(value: number, u: number): string {
  if (!(u > 0)) return String(Number(value.toPrecision(6)));
  const decimals = Math.max(0, 1 - Math.floor(Math.log10(u)));
  return `${value.toFixed(decimals)} ± ${u.toFixed(decimals)}`;
}

/** A device's uncertainties under their own keys ({ pmp_w: 8.8 } → { u_pmp_w: 8.8 }), as the API sends them. */
export function uncertaintyByKey(u: Partial<Record<ParamKey, number>> | undefined): Record<string, number> {
  const out: Record<string, number> = {};
  for (const p of UNCERTAIN_PARAMS) {
    const v = u?.[p.param];
    if (typeof v === 'number' && Number.isFinite(v)) out[p.key] = v;
  }
  return out;
}

/** A stored value with its expanded uncertainty for the screens: "287.0 ± 8.8 W"; without one as the key table writes it. */
export function formatWithUncertainty(key: string, value: number | null | undefined, u: number | null | undefined): string {
  if (value == null || !Number.isFinite(value)) return '—';
  if (!(typeof u === 'number' && u > 0)) return formatVocabulary(key, value);
  const unit = unitOf(key);
  return `${valuePlusMinus(value, u)}${unit ? ` ${unit}` : ''}`;
}
