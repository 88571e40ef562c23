/**
 * The whole per-file pipeline the server runs on an upload (and the seed on the demo files):
 * read → key figures and flags → single- and double-diode fits → STC figures from the first
 * method that holds (lib/analysis/stc.ts). Pure: bytes in, plain objects out; throws
 * IvInputError for unusable files.
 */
import { analyseCurve, parseIvBytes, singleDiodeParamsOf } from '@/lib/iv';
import type { CurveMeta, FitResult, Flag, IvCurve, Metrics, SingleDiodeParams } from '@/lib/iv';
import { stcOutcome } from '@/lib/analysis/stc';
import type { StcCoefficients } from '@/lib/analysis/stc';
import type { StcOutcome } from '@/lib/schemas/curves';

/** What a batch says for files that do not: cells, area, irradiance, and the module type's coefficients. */
export type FileDefaults = { cells?: number | null; area_cm2?: number | null; irradiance_w_m2?: number | null; coefficients?: StcCoefficients };
export type FileOverrides = Partial<Pick<CurveMeta, 'temp_c' | 'irradiance_w_m2' | 'cells' | 'area_cm2'>>;

export type FileAnalysis = {
  curve: IvCurve;
  metrics: Metrics;
  flags: Flag[];
  fits: FitResult[];
  /** The STC figures with their method, or `{ method: 'none', reason }`. */
  stc: StcOutcome;
  conditions: { temp_c: number; cells: number; irradiance_w_m2: number | null; idealities: 'fixed' | 'free' };
};

function clean<T extends object>(o: T): Partial<T> {
  return Object.fromEntries(Object.entries(o).filter(([, v]) => v !== undefined && v !== null)) as Partial<T>;
}

/** Fitted single-diode parameters, or null when that fit did not converge. */
export function singleParams(fits: FitResult[]): SingleDiodeParams | null {
  return singleDiodeParamsOf(fits.find((x) => x.model === 'single-diode' && x.converged));
}

/** Runs the pipeline on one file. Precedence of metadata: overrides > the file > batch defaults. */
export function analyseFile(
  bytes: Uint8Array,
  opts: { fileName: string; overrides?: FileOverrides; defaults?: FileDefaults; idealities?: 'fixed' | 'free'; models?: ('single' | 'double')[] },
): FileAnalysis {
  const parsed = parseIvBytes(bytes, { fileName: opts.fileName, overrides: clean(opts.overrides ?? {}) });
  const meta: CurveMeta = { ...parsed.meta };
  const d = opts.defaults ?? {};
  if (meta.cells == null && d.cells) meta.cells = d.cells;
  if (meta.area_cm2 == null && d.area_cm2) meta.area_cm2 = d.area_cm2;
  if (meta.irradiance_w_m2 == null && d.irradiance_w_m2) meta.irradiance_w_m2 = d.irradiance_w_m2;
  const curve: IvCurve = { ...parsed, meta };
  // `models: []` reads and checks only (key figures, flags): the fits then come from a queued job.
  return analyseParsed(curve, opts.idealities ?? 'fixed', opts.models, d.coefficients);
}

/** The pipeline after reading: used for refits with corrected metadata too. */
export function analyseParsed(curve: IvCurve, idealities: 'fixed' | 'free' = 'fixed', models?: ('single' | 'double')[], coefficients?: StcCoefficients): FileAnalysis {
  const { metrics, flags, fits, conditions } = analyseCurve(curve, { idealities, models });
  const { temp_c, cells } = conditions;
  const stc = stcOutcome({ curve, metrics, flags, params: singleParams(fits), cells, coefficients });
  // Reading only (`models: []`, the fits queued): no STC verdict yet, so no flag about it.
  if (stc.method === 'none' && models?.length !== 0) flags.push({ code: 'stc-unavailable', severity: 'warn', message: `No STC figures: ${stc.reason}` });
  return { curve, metrics, flags, fits, stc, conditions: { temp_c, cells, irradiance_w_m2: curve.meta.irradiance_w_m2 ?? null, idealities } };
}
