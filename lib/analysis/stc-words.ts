/**
 * The STC outcome of a curve in words for screens and messages: the method's name, the sentence
 * that says what it used, its inputs as labelled values (the key table), or why there are no
 * STC figures. Pure and light (no physics), so screens can import it.
 */
import type { StcInputs, StcOutcome } from '@/lib/schemas/curves';
import { formatValue, labelOf } from '@/lib/vocabulary';

const METHOD_NAMES = {
  measured: 'Measured at STC',
  'iec60891-1': 'IEC 60891 procedure 1',
  model: 'Fitted single-diode model',
  none: 'No method holds',
} as const;

/** The method's name as a heading: "IEC 60891 procedure 1". */
export function stcMethodName(stc: StcOutcome | null | undefined): string {
  if (!stc) return 'Not computed';
  return METHOD_NAMES[stc.method] ?? String(stc.method);
}

/** The sentence that says how the figures were had (or, for an older stored row, what it was). */
export function stcBasisText(stc: StcOutcome | null | undefined): string {
  if (!stc) return 'No STC figures were computed for this curve.';
  if (stc.method === 'none') return `No STC figures: ${stc.reason}`;
  if (stc.basis) return stc.basis;
  return `From the fitted single diode at ${stc.from.temp_c} °C and ${stc.from.irradiance_w_m2} W/m², moved to 1000 W/m² and 25 °C by the De Soto, Klein & Beckman (2006) scaling (stored before the methods were checked; fit the curve again to check it).`;
}

/** Order of the inputs on screen. */
const INPUT_ORDER: (keyof StcInputs)[] = [
  'alpha_pct_per_k',
  'beta_pct_per_k',
  'gamma_pct_per_k',
  'alpha_a_per_k',
  'beta_v_per_k',
  'rs_ohm',
  'kappa_ohm_per_k',
  'isc1_a',
  'n',
  'model_beta_pct_per_k',
  'model_gamma_pct_per_k',
  'agreement_tolerance_pct',
  'model_temp_window_k',
  'temp_tolerance_k',
  'irradiance_tolerance_pct',
];

/** Labels that say more on this card than the key table's (the relative and absolute α share one there). */
const OWN_LABELS: Partial<Record<keyof StcInputs, string>> = {
  alpha_pct_per_k: 'α, Isc temperature coefficient (batch)',
  beta_pct_per_k: 'β, Voc temperature coefficient (batch)',
  gamma_pct_per_k: 'γ, Pmax temperature coefficient (batch)',
  alpha_a_per_k: 'α used, in A/K at the STC Isc',
  beta_v_per_k: 'β used, in V/K at the STC Voc',
  rs_ohm: 'Rs, internal series resistance',
  n: 'n of the fit, per cell',
};
const WINDOWS = new Set<keyof StcInputs>(['temp_tolerance_k', 'model_temp_window_k', 'irradiance_tolerance_pct']);

/** The numeric inputs of a method as label and shown value ("α, Isc temperature coefficient", "0.05 %/K"). */
export function stcInputRows(stc: StcOutcome | null | undefined): { key: string; label: string; value: string }[] {
  if (!stc || stc.method === 'none' || !stc.inputs) return [];
  const inputs = stc.inputs as Record<string, unknown>;
  return INPUT_ORDER.filter((k) => typeof inputs[k] === 'number').map((k) => {
    const v = inputs[k] as number;
    const label = OWN_LABELS[k] ?? labelOf(k);
    const shown = WINDOWS.has(k) ? `± ${formatValue(k, v)}` : formatValue(k, v);
    return { key: k, label, value: shown };
  });
}
