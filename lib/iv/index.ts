/**
 * The I-V engine: reading measured curves, key figures without a model, single- and
 * double-diode models and their fits. Pure TypeScript, no I/O.
 */
export { IvInputError } from '@/lib/iv/errors';
export type {
  CurveMeta,
  MetaEntry,
  DoubleDiodeFit,
  DoubleDiodeParams,
  FitModel,
  FitObjective,
  FitResult,
  FitSummary,
  Flag,
  IvCurve,
  Metrics,
  OmitEach,
  SingleDiodeFit,
  SingleDiodeParams,
} from '@/lib/iv/types';
export { doubleDiodeParamsOf, isDoubleDiodeFit, isSingleDiodeFit, singleDiodeParamsOf } from '@/lib/iv/fit-params';
export { parseIvBytes, parseIvText, checkCurveReach, MAX_FILE_BYTES, MAX_DATA_ROWS, MIN_POINTS, ISC_EXTRAPOLATION_LIMIT, VOC_EXTRAPOLATION_LIMIT } from '@/lib/iv/parse';
export type { ParseOptions } from '@/lib/iv/parse';
export { keyFigures, estimateNoise_A } from '@/lib/iv/key-figures';
export { lambertW, lambertWExp } from '@/lib/iv/lambert-w';
export {
  doubleDiodeCurrent,
  doubleDiodeVoltage,
  gaussian,
  idealityVoltage_V,
  seededRandom,
  simulateCurve,
  singleDiodeCurrent,
  singleDiodeCurrents,
  singleDiodeVoltage,
} from '@/lib/iv/diode';
export type { SimulateOptions } from '@/lib/iv/diode';
export { phangStart } from '@/lib/iv/start';
export { DEFAULT_TEMP_C } from '@/lib/iv/fit-common';
export { fitSingleDiode } from '@/lib/iv/fit-single';
export type { SingleFitOptions } from '@/lib/iv/fit-single';
export { fitDoubleDiode, DEFAULT_I0_MAX_A } from '@/lib/iv/fit-double';
export type { DoubleFitOptions } from '@/lib/iv/fit-double';
// The ml-levenberg-marquardt comparison fit lives in bench/fit-ml.ts: only the benchmark uses it.
export { analyseCurve } from '@/lib/iv/analyse';
export { isPoorFit, POOR_FIT_SHARE } from '@/lib/iv/fit-quality';
export { cellCountCheck, COMMON_CELL_COUNTS, fitPlausibilityFlags, PHYSICAL_IDEALITY, PHYSICAL_VOC_PER_CELL_V, SILICON_VOC_PER_CELL_V, suggestCells, vocPerCellFlag } from '@/lib/iv/plausibility';
export type { AnalyseOptions } from '@/lib/iv/analyse';
