/**
 * Characterisation of one device type from curves measured at several irradiances and cell
 * temperatures: temperature coefficients (coefficients.ts), IEC 60891 procedure 1 and 2
 * parameters (iec60891-params.ts), the IEC 61853-1 power matrix with the relative efficiency at
 * 25 °C (matrix.ts) and the STC figures read from it. Pure; the CLI (`characterise`) and the API
 * (GET /api/batches/:id/characterisation) hand it curves and send its answer as it is.
 */
import { temperatureCoefficients } from '@/lib/analysis/characterise/coefficients';
import type { Coefficient, CoefficientSet } from '@/lib/analysis/characterise/coefficients';
import { iec60891Parameters } from '@/lib/analysis/characterise/iec60891-params';
import type { Iec60891Result } from '@/lib/analysis/characterise/iec60891-params';
import { efficiencyAt25, powerMatrix } from '@/lib/analysis/characterise/matrix';
import type { MatrixCell, Uncovered } from '@/lib/analysis/characterise/matrix';
import type { Procedure } from '@/lib/analysis/characterise/translate-figures';
import type { CellFigures, CharCurve, Refusal } from '@/lib/analysis/characterise/types';

export type { CharCurve } from '@/lib/analysis/characterise/types';

/**
 * One coefficient's regression, in relative terms so every key has one unit: each point's figure
 * as % of the line's value at 25 °C (`relative_pct`), the line 100 + pct_per_k·(T − 25).
 */
type CoefficientOut = {
  figure: string;
  pct_per_k: number;
  pct_per_k_se: number | null;
  r2: number | null;
  points: { temp_c: number; relative_pct: number; curve: string }[];
};
export type Characterisation = {
  device: string | null;
  curves: number;
  alpha_isc_pct_per_k: number;
  beta_voc_pct_per_k: number;
  gamma_pmp_pct_per_k: number;
  alpha_isc_a_per_k: number;
  beta_voc_v_per_k: number;
  gamma_pmp_w_per_k: number;
  stderr: {
    alpha_isc_pct_per_k: number | null;
    beta_voc_pct_per_k: number | null;
    gamma_pmp_pct_per_k: number | null;
    alpha_isc_a_per_k: number | null;
    beta_voc_v_per_k: number | null;
    gamma_pmp_w_per_k: number | null;
  };
  regression: {
    irradiance_wm2: number;
    curves: number;
    temp_min_c: number;
    temp_max_c: number;
    span_k: number;
    /** The regression lines' values at 25 °C (at the regression's irradiance). */
    at_25c: { isc_a: number; voc_v: number; pmp_w: number };
    alpha: CoefficientOut;
    beta: CoefficientOut;
    gamma: CoefficientOut;
  };
  iec60891: {
    procedure1: { rs_ohm: number; kappa_ohm_per_k: number; alpha_a_per_k: number; beta_v_per_k: number; rs_residual_pct: number; kappa_residual_pct: number; rs_curves: string[]; kappa_curves: string[] } | Refusal;
    procedure2: {
      rs_ohm: number;
      kappa_ohm_per_k: number;
      a_irradiance: number;
      alpha_rel_per_k: number;
      beta_rel_per_k: number;
      a_residual_v: number;
      rs_residual_pct: number;
      kappa_residual_pct: number;
      rs_curves: string[];
      kappa_curves: string[];
    } | Refusal;
  };
  matrix: MatrixCell[];
  not_covered: Uncovered[];
  stc: CellFigures | null;
  efficiency: ReturnType<typeof efficiencyAt25>;
  notes: string[];
};

const out = (c: Coefficient): CoefficientOut => ({
  figure: c.figure,
  pct_per_k: c.pct_per_k,
  pct_per_k_se: c.pct_per_k_se,
  r2: c.r2,
  points: c.points.map((p) => ({ temp_c: p.temp_c, relative_pct: (100 * p.value) / c.value_at_25c, curve: p.curve_id })),
});

function iecOut(r: Iec60891Result): Characterisation['iec60891'] {
  const p1 = r.procedure1;
  const p2 = r.procedure2;
  return {
    procedure1:
      'error' in p1
        ? p1
        : { rs_ohm: p1.rs_ohm, kappa_ohm_per_k: p1.kappa_ohm_per_k, alpha_a_per_k: p1.alpha_a_per_k, beta_v_per_k: p1.beta_v_per_k, rs_residual_pct: p1.rs.residual_pct, kappa_residual_pct: p1.kappa.residual_pct, rs_curves: p1.rs.curves, kappa_curves: p1.kappa.curves },
    procedure2:
      'error' in p2
        ? p2
        : {
            rs_ohm: p2.rs_ohm,
            kappa_ohm_per_k: p2.kappa_ohm_per_k,
            a_irradiance: p2.a_irradiance,
            alpha_rel_per_k: p2.alpha_rel_per_k,
            beta_rel_per_k: p2.beta_rel_per_k,
            a_residual_v: p2.a.residual_v,
            rs_residual_pct: p2.rs.residual_pct,
            kappa_residual_pct: p2.kappa.residual_pct,
            rs_curves: p2.rs.curves,
            kappa_curves: p2.kappa.curves,
          },
  };
}

/** The characterisation of one device's curves, or the reason it cannot be made. */
export function characterise(curves: readonly CharCurve[], opts: { device?: string | null } = {}): Characterisation | Refusal {
  if (curves.length < 3) return { error: `a characterisation needs at least 3 curves of one device; ${curves.length === 1 ? '1 was' : `${curves.length} were`} given` };
  const bad = curves.find((c) => !(c.irradiance_w_m2 > 0) || !Number.isFinite(c.temp_c));
  if (bad) return { error: `curve ${bad.id} does not state its irradiance and cell temperature` };
  const coefficients = temperatureCoefficients(curves);
  if ('error' in coefficients) return coefficients;
  const iec = iec60891Parameters(curves, coefficients);
  const notes = [...coefficients.notes];
  const procedures: (Procedure & { residual: number })[] = [];
  if (!('error' in iec.procedure1)) {
    const p = iec.procedure1;
    procedures.push({ procedure: 1, params: { alpha_a_per_k: p.alpha_a_per_k, beta_v_per_k: p.beta_v_per_k, rs_ohm: p.rs_ohm, kappa_ohm_per_k: p.kappa_ohm_per_k }, residual: Math.max(p.rs.residual_pct, p.kappa.residual_pct) });
  }
  if (!('error' in iec.procedure2)) {
    const p = iec.procedure2;
    procedures.push({
      procedure: 2,
      params: { alpha_rel_per_k: p.alpha_rel_per_k, beta_rel_per_k: p.beta_rel_per_k, a_irradiance: p.a_irradiance, rs_ohm: p.rs_ohm, kappa_ohm_per_k: p.kappa_ohm_per_k },
      residual: Math.max(p.rs.residual_pct, p.kappa.residual_pct),
    });
  }
  procedures.sort((a, b) => a.residual - b.residual);
  const procedureError = 'error' in iec.procedure1 ? iec.procedure1.error : undefined;
  if (!procedures.length) notes.push(`Matrix points without a measured curve are not filled: ${procedureError}.`);
  const { matrix, not_covered } = powerMatrix(curves, procedures, procedureError);
  const stcCell = matrix.find((c) => c.irradiance_wm2 === 1000 && c.temp_c === 25);
  const area = curves.find((c) => c.area_cm2 && c.area_cm2 > 0)?.area_cm2;
  const c = coefficients as CoefficientSet;
  return {
    device: opts.device ?? null,
    curves: curves.length,
    alpha_isc_pct_per_k: c.alpha.pct_per_k,
    beta_voc_pct_per_k: c.beta.pct_per_k,
    gamma_pmp_pct_per_k: c.gamma.pct_per_k,
    alpha_isc_a_per_k: c.alpha.per_k,
    beta_voc_v_per_k: c.beta.per_k,
    gamma_pmp_w_per_k: c.gamma.per_k,
    stderr: {
      alpha_isc_pct_per_k: c.alpha.pct_per_k_se,
      beta_voc_pct_per_k: c.beta.pct_per_k_se,
      gamma_pmp_pct_per_k: c.gamma.pct_per_k_se,
      alpha_isc_a_per_k: c.alpha.per_k_se,
      beta_voc_v_per_k: c.beta.per_k_se,
      gamma_pmp_w_per_k: c.gamma.per_k_se,
    },
    regression: {
      irradiance_wm2: c.irradiance_w_m2,
      curves: c.curves,
      temp_min_c: c.temp_min_c,
      temp_max_c: c.temp_max_c,
      span_k: c.span_k,
      at_25c: { isc_a: c.alpha.value_at_25c, voc_v: c.beta.value_at_25c, pmp_w: c.gamma.value_at_25c },
      alpha: out(c.alpha),
      beta: out(c.beta),
      gamma: out(c.gamma),
    },
    iec60891: iecOut(iec),
    matrix,
    not_covered,
    stc: stcCell ? { pmp_w: stcCell.pmp_w, voc_v: stcCell.voc_v, isc_a: stcCell.isc_a, ff_pct: stcCell.ff_pct } : null,
    efficiency: efficiencyAt25(matrix, area),
    notes,
  };
}
