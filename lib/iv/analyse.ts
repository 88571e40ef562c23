/** One call for a whole curve, as the server and the CLI use it: key figures, flags and fits. */
import { fitConditions } from '@/lib/iv/fit-common';
import { fitDoubleDiode } from '@/lib/iv/fit-double';
import { fitSingleDiode } from '@/lib/iv/fit-single';
import { isPoorFit } from '@/lib/iv/fit-quality';
import { keyFigures } from '@/lib/iv/key-figures';
import { measurementFlags } from '@/lib/iv/meta-flags';
import { cellCountCheck, fitPlausibilityFlags, vocPerCellFlag } from '@/lib/iv/plausibility';
import type { FitObjective, FitResult, Flag, IvCurve, Metrics, SingleDiodeFit } from '@/lib/iv/types';

/** Options of `analyseCurve`; temp_c and cells override the curve's metadata. */
export type AnalyseOptions = {
  temp_c?: number;
  cells?: number;
  objective?: FitObjective;
  /** Idealities of the double-diode fit (default 'fixed': n1 = 1, n2 = 2). */
  idealities?: 'fixed' | 'free';
  /** Which fits to run, in this order (default both). */
  models?: ('single' | 'double')[];
};


/**
 * Key figures, flags and the single- and double-diode fits of one curve. Throws IvInputError
 * when the curve is unusable; a fit that fails is reported in `fits` (converged false) and flagged.
 */
export function analyseCurve(
  curve: IvCurve,
  opts: AnalyseOptions = {},
): { metrics: Metrics; flags: Flag[]; fits: FitResult[]; conditions: { temp_c: number; cells: number } } {
  const { metrics, flags } = keyFigures(curve);
  const given = fitConditions(curve, opts);
  const temp_c = given.temp_c;
  flags.push(...measurementFlags(curve.meta));
  if (opts.temp_c === undefined && curve.meta?.temp_c === undefined) {
    flags.push({
      code: 'temperature-assumed',
      severity: 'info',
      message: 'No cell temperature was given, so 25 °C was assumed for the diode fits; the ideality factor depends on it.',
    });
  }
  // A missing count is suggested from Voc and used; a given one is used and checked (lib/iv/plausibility).
  const count = cellCountCheck(metrics, opts.cells ?? curve.meta?.cells, opts.temp_c ?? curve.meta?.temp_c, curve.meta?.irradiance_w_m2);
  const cells = count.cells;
  if (count.flag) flags.push(count.flag);
  const vocFlag = vocPerCellFlag(metrics.voc_v, cells);
  if (vocFlag) flags.push(vocFlag);

  const fits: FitResult[] = [];
  let single: SingleDiodeFit | undefined;
  for (const model of opts.models ?? ['single', 'double']) {
    if (model === 'single') {
      single = fitSingleDiode(curve, { temp_c, cells, metrics, objective: opts.objective });
      fits.push(single);
    } else {
      fits.push(fitDoubleDiode(curve, { temp_c, cells, metrics, objective: opts.objective, idealities: opts.idealities, single: single?.objective === 'true-current' ? single : undefined }));
    }
  }
  for (const fit of fits) {
    if (!fit.converged) {
      flags.push({ code: 'fit-failed', severity: 'warn', message: `The ${fit.model} fit did not converge, so it gives no parameters. ${fit.message ?? ''}`.trim() });
    } else if (fit.model === 'single-diode' && isPoorFit(fit, metrics.isc_a)) {
      flags.push({
        code: 'poor-fit',
        severity: 'warn',
        message: `The single-diode model misses this curve by ${Number((((fit.rmse_true_current_a ?? 0) / metrics.isc_a) * 100).toPrecision(2))} % of Isc on average: the curve has a shape one diode cannot make (steps, mismatch, noise or a wrong cell count).`,
      });
    }
  }
  flags.push(...fitPlausibilityFlags(single?.converged ? single : undefined));
  return { metrics, flags, fits, conditions: { temp_c, cells } };
}
