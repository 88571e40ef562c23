import { ELV_LIMIT_V } from '@/lib/strings/cautions';

/** The flag codes the engine raises, with a short label for lists and spec forms. */
export const FLAG_CODES = {
  step: 'Step or second knee (bypass diode, mismatch, cracked cells)',
  'low-shunt': 'Low shunt resistance',
  'high-series-resistance': 'High series resistance',
  noisy: 'Noisy measurement',
  'poor-fit': 'Diode model misses the curve',
  'fit-failed': 'Fit did not converge',
  'cells-unknown': 'Cell count not given',
  'cells-check': 'Cell count does not match Voc',
  'voc-per-cell-unphysical': 'Voc per cell outside 0.3–0.95 V',
  'ideality-unphysical': 'Ideality factor outside 0.9–2.5',
  'fit-parameter-impossible': 'Fit needs an impossible parameter',
  'stc-unavailable': 'No STC figures',
  'isc-extrapolated': 'Isc extrapolated',
  'voc-extrapolated': 'Voc extrapolated',
  'temperature-assumed': 'Temperature assumed 25 °C',
  'high-voltage': `Above ${ELV_LIMIT_V} V DC`,
  'irradiance-unsteady': 'Irradiance changed more than 2 % during the sweep',
} as const;

export type FlagCode = keyof typeof FLAG_CODES;
