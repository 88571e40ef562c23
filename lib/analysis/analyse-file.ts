/**
 * The whole per-file pipeline the server runs on an upload (and the seed on the demo files):
 * read → key figures and flags → single- and double-diode fits → STC figures from the fitted
 * single-diode model. Pure: bytes in, plain objects out; throws IvInputError for unusable files.
 */
import { analyseCurve, parseIvBytes, singleDiodeParamsOf } from '@/lib/iv';
import type { CurveMeta, FitResult, Flag, IvCurve, Metrics, SingleDiodeParams } from '@/lib/iv';
import { circuitFigures, singleDiodeCircuit, translateModel } from '@/lib/physics';
import { STC } from '@/lib/physics/constants';
import type { StcFigures } from '@/lib/schemas/curves';

export type FileDefaults = { cells?: number | null; area_cm2?: number | null };
export type FileOverrides = Partial<Pick<CurveMeta, 'temp_c' | 'irradiance_w_m2' | 'cells' | 'area_cm2'>>;

export type FileAnalysis = {
  curve: IvCurve;
  metrics: Metrics;
  flags: Flag[];
  fits: FitResult[];
  stc: StcFigures | null;
  conditions: { temp_c: number; cells: number; irradiance_w_m2: number | null; idealities: 'fixed' | 'free' };
};

function clean<T extends object>(o: T): Partial<T> {
  return Object.fromEntries(Object.entries(o).filter(([, v]) => v !== undefined && v !== null)) as Partial<T>;
}

/** Fitted single-diode parameters, or null when that fit did not converge. */
export function singleParams(fits: FitResult[]): SingleDiodeParams | null {
  return singleDiodeParamsOf(fits.find((x) => x.model === 'single-diode' && x.converged));
}

/**
 * STC figures from the fitted single-diode model (De Soto et al. 2006 scaling). When the file
 * gives no irradiance, 1000 W/m² is assumed and said in the notes.
 */
export function stcFigures(params: SingleDiodeParams, cells: number, temp_c: number, irradiance_w_m2: number | null, area_cm2: number | null): StcFigures | null {
  const notes: string[] = [];
  const g = irradiance_w_m2 ?? STC.irradiance_w_m2;
  if (irradiance_w_m2 == null) notes.push('No irradiance given: the measurement was taken as 1000 W/m².');
  try {
    const t = translateModel(params, { cells, from: { irradiance_w_m2: g, temp_c }, to: { irradiance_w_m2: STC.irradiance_w_m2, temp_c: STC.temp_c } });
    const f = circuitFigures(singleDiodeCircuit(t.params), cells, STC.temp_c);
    const efficiency = area_cm2 ? f.pmp_w / (STC.irradiance_w_m2 * area_cm2 * 1e-4) : null;
    return { method: 'model', from: { irradiance_w_m2: g, temp_c }, ...f, efficiency, notes: [...notes, ...t.notes] };
  } catch {
    return null;
  }
}

/** Runs the pipeline on one file. Precedence of metadata: overrides > the file > batch defaults. */
export function analyseFile(
  bytes: Uint8Array,
  opts: { fileName: string; overrides?: FileOverrides; defaults?: FileDefaults; idealities?: 'fixed' | 'free' },
): FileAnalysis {
  const parsed = parseIvBytes(bytes, { fileName: opts.fileName, overrides: clean(opts.overrides ?? {}) });
  const meta: CurveMeta = { ...parsed.meta };
  if (meta.cells == null && opts.defaults?.cells) meta.cells = opts.defaults.cells;
  if (meta.area_cm2 == null && opts.defaults?.area_cm2) meta.area_cm2 = opts.defaults.area_cm2;
  const curve: IvCurve = { ...parsed, meta };
  return analyseParsed(curve, opts.idealities ?? 'fixed');
}

/** The pipeline after reading: used for refits with corrected metadata too. */
export function analyseParsed(curve: IvCurve, idealities: 'fixed' | 'free' = 'fixed', models?: ('single' | 'double')[]): FileAnalysis {
  const { metrics, flags, fits } = analyseCurve(curve, { idealities, models });
  const temp_c = curve.meta.temp_c ?? 25;
  const cells = curve.meta.cells ?? 1;
  const p = singleParams(fits);
  const stc = p ? stcFigures(p, cells, temp_c, curve.meta.irradiance_w_m2 ?? null, curve.meta.area_cm2 ?? null) : null;
  return { curve, metrics, flags, fits, stc, conditions: { temp_c, cells, irradiance_w_m2: curve.meta.irradiance_w_m2 ?? null, idealities } };
}
