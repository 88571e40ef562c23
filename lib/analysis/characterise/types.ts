/** Shapes of the characterisation engine (lib/analysis/characterise). JSON keys are snake_case with units. */
import type { Metrics } from '@/lib/iv/types';

/** One measured curve of the device with its conditions and key figures. */
export type CharCurve = {
  /** The curve's id (API) or file name (CLI): what a matrix cell names as its source. */
  id: string;
  irradiance_w_m2: number;
  temp_c: number;
  voltage_v: number[];
  current_a: number[];
  metrics: Pick<Metrics, 'isc_a' | 'voc_v' | 'pmp_w' | 'imp_a' | 'vmp_v' | 'ff'>;
  cells?: number;
  area_cm2?: number;
};

/** Key figures of a matrix cell or of STC. */
export type CellFigures = { pmp_w: number; voc_v: number; isc_a: number; ff_pct: number };

/** A result that could not be had, with the reason in words. */
export type Refusal = { error: string };
