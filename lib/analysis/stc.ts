/**
 * A curve's figures at standard test conditions (STC: 1000 W/m², 25 °C), only from a method that
 * holds for the curve, tried in this order:
 *
 * 1. **measured** — the curve was measured within ±2 °C and ±2 % of 1000 W/m² of STC: its own
 *    key figures are the STC figures. The window is the 25 ± 2 °C that STC measurements are
 *    commonly held to, with the same share on irradiance (common practice; IEC 60891:2021 was not
 *    at hand to quote its wording, so the window is stated here, not claimed from the standard).
 * 2. **iec60891-1** — IEC 60891 procedure 1 on the measured curve (lib/physics/translate.ts) with
 *    the batch's (module type's) coefficients: α and β are required; Rs is required when the
 *    irradiance is outside the window (inside it the Rs term moves the curve by at most
 *    Rs·2 %·Isc and Rs is taken as 0, said in the notes); κ is taken as 0 when not given (said).
 *    The relative coefficients become absolute ones at the STC values, which are estimated from
 *    the measured Isc and Voc: α = α%·Isc1·(1000/G1)/(1 + α%·(T1 − 25)), β = β%·Voc1/(1 + β%·(T1 − 25)).
 * 3. **model** — the fitted single diode moved to STC (lib/physics translateModel, with the
 *    n_i-power law of the physics page so the two agree), only when the fit passes its quality
 *    test (converged, no poor-fit, ideality, impossible-parameter or cell-count flag, n within
 *    0.9–2.5) and its temperature behaviour agrees with the batch's coefficients: the model's
 *    dVoc/dT and dPmax/dT at STC within 25 % of β and γ (a tolerance chosen here, no standard
 *    value). Without β or γ to check against, the model is used only within ±2 K of 25 °C.
 *
 * A curve with a step (bypass diode, mismatch, cracked cells) gets no STC figures by any method:
 * no translation describes it and its measured figures are not the module's at uniform light.
 * When no method holds the outcome is `{ method: 'none', reason }`, the reason in words (lower case,
 * to follow "No STC figures: " or "Pmax at STC not measurable: ").
 */
import type { Flag, IvCurve, Metrics, SingleDiodeParams } from '@/lib/iv';
import { PHYSICAL_IDEALITY } from '@/lib/iv/plausibility';
import { circuitFigures, singleDiodeCircuit, translateCurve, translateModel } from '@/lib/physics';
import { STC } from '@/lib/physics/constants';
import type { StcAbsent, StcFigures, StcInputs, StcOutcome } from '@/lib/schemas/curves';

/** The window around STC within which the measured figures are the STC figures. */
export const STC_TOLERANCE = { temp_k: 2, irradiance_pct: 2 } as const;
/** Without coefficients to check it against, the model is used only this close to 25 °C, K. */
export const MODEL_TEMP_WINDOW_K = 2;
/** The model's dVoc/dT and dPmax/dT must agree with β and γ within this share of them, %. */
export const MODEL_AGREEMENT_PCT = 25;
/** The I0 temperature law of the model method: the physics page's (lib/physics/fit-physics). */
const MODEL_I0_LAW = 'ni-power' as const;

/** A module type's coefficients as a batch holds them (all optional). */
export type StcCoefficients = {
  alpha_pct_per_k?: number | null;
  beta_pct_per_k?: number | null;
  gamma_pct_per_k?: number | null;
  rs_ohm?: number | null;
  kappa_ohm_per_k?: number | null;
};

/** What the choice needs of one analysed curve. */
export type StcInput = {
  curve: IvCurve;
  metrics: Metrics;
  flags: Flag[];
  /** The converged single-diode parameters, or null. */
  params: SingleDiodeParams | null;
  /** Cells in series the fits used. */
  cells: number;
  coefficients?: StcCoefficients;
};

const fmt = (x: number, d = 1) => x.toFixed(d);
const minus = (t: string) => t.replace(/^-/, '−');
const pct = (x: number) => `${x > 0 ? '+' : ''}${minus(String(Number(x.toPrecision(3))))} %/K`;
const sig3 = (x: number) => minus(String(Number(x.toPrecision(3))));
const finite = (x: number | null | undefined): x is number => typeof x === 'number' && Number.isFinite(x);

/** Flags that mean the single-diode fit does not describe the curve. */
const FIT_QUALITY_FLAGS: Record<string, string> = {
  'poor-fit': 'it misses the curve (poor fit)',
  'fit-failed': 'a fit did not converge',
  'ideality-unphysical': 'its ideality factor is outside what a silicon diode has',
  'fit-parameter-impossible': 'it needs an impossible parameter',
  'cells-check': 'the cell count does not match Voc',
  'voc-per-cell-unphysical': 'Voc per cell is not a cell’s',
};

type Tried = { ok: true; stc: StcFigures } | { ok: false; why: string };

function window(): Pick<StcInputs, 'temp_tolerance_k' | 'irradiance_tolerance_pct'> {
  return { temp_tolerance_k: STC_TOLERANCE.temp_k, irradiance_tolerance_pct: STC_TOLERANCE.irradiance_pct };
}

function efficiencyAtStc(pmp_w: number, area_cm2: number | undefined): number | null {
  return area_cm2 && area_cm2 > 0 ? pmp_w / (STC.irradiance_w_m2 * area_cm2 * 1e-4) : null;
}

function figures(m: Pick<Metrics, 'isc_a' | 'voc_v' | 'pmp_w' | 'imp_a' | 'vmp_v' | 'ff'>, area: number | undefined) {
  return { isc_a: m.isc_a, voc_v: m.voc_v, pmp_w: m.pmp_w, imp_a: m.imp_a, vmp_v: m.vmp_v, ff: m.ff, efficiency: efficiencyAtStc(m.pmp_w, area) };
}

function measured(x: StcInput, from: StcFigures['from'], notes: string[]): Tried {
  const dT = from.temp_c - STC.temp_c;
  const dG = (100 * (from.irradiance_w_m2 - STC.irradiance_w_m2)) / STC.irradiance_w_m2;
  const within = Math.abs(dT) <= STC_TOLERANCE.temp_k && Math.abs(dG) <= STC_TOLERANCE.irradiance_pct;
  const meta = x.curve.meta;
  const where = `${fmt(from.temp_c)} °C${meta.temp_c == null ? ' (assumed)' : ''} and ${fmt(from.irradiance_w_m2, 0)} W/m²${meta.irradiance_w_m2 == null ? ' (assumed)' : ''}`;
  if (!within) {
    return { ok: false, why: `measured at ${where}, outside ±${STC_TOLERANCE.temp_k} °C and ±${STC_TOLERANCE.irradiance_pct} % of standard test conditions` };
  }
  return {
    ok: true,
    stc: {
      method: 'measured',
      from,
      ...figures(x.metrics, x.curve.meta.area_cm2),
      basis: `Measured at ${where}, within ±${STC_TOLERANCE.temp_k} °C and ±${STC_TOLERANCE.irradiance_pct} % of 25 °C and 1000 W/m² (the window taken as standard test conditions): the measured figures, not translated.`,
      inputs: window(),
      notes,
    },
  };
}

function procedure1(x: StcInput, from: StcFigures['from'], notes: string[]): Tried {
  const c = x.coefficients ?? {};
  const missing = [!finite(c.alpha_pct_per_k) ? 'α (Isc)' : null, !finite(c.beta_pct_per_k) ? 'β (Voc)' : null].filter(Boolean);
  if (missing.length) return { ok: false, why: `IEC 60891 procedure 1 needs the module type's temperature coefficients ${missing.join(' and ')}, which the batch does not give` };
  const a = (c.alpha_pct_per_k as number) / 100;
  const b = (c.beta_pct_per_k as number) / 100;
  const dT1 = from.temp_c - STC.temp_c;
  const gWithin = Math.abs(from.irradiance_w_m2 / STC.irradiance_w_m2 - 1) * 100 <= STC_TOLERANCE.irradiance_pct;
  const own: string[] = [];
  let rs = c.rs_ohm;
  if (!finite(rs)) {
    if (!gWithin) return { ok: false, why: `IEC 60891 procedure 1 needs the internal series resistance Rs to correct from ${fmt(from.irradiance_w_m2, 0)} W/m², which the batch does not give` };
    rs = 0;
    own.push('Rs not given: taken as 0 Ω (the irradiance is within ±2 % of 1000 W/m², so its term moves the curve by at most Rs·2 % of Isc).');
  }
  let kappa = c.kappa_ohm_per_k;
  if (!finite(kappa)) {
    kappa = 0;
    own.push('κ not given: taken as 0 Ω/K, so the change of the fill factor with temperature beyond α and β is not corrected.');
  }
  const iscStc = (x.metrics.isc_a * (STC.irradiance_w_m2 / from.irradiance_w_m2)) / (1 + a * dT1);
  const vocStc = x.metrics.voc_v / (1 + b * dT1);
  const alpha_a_per_k = a * iscStc;
  const beta_v_per_k = b * vocStc;
  try {
    const r = translateCurve(x.curve, { method: 'iec60891-1', from, to: { ...STC }, alpha_a_per_k, beta_v_per_k, rs_ohm: rs, kappa_ohm_per_k: kappa, isc1_a: x.metrics.isc_a });
    if (!r.figures) return { ok: false, why: `IEC 60891 procedure 1 gave a curve without key figures (${r.figures_error ?? 'unknown reason'})` };
    return {
      ok: true,
      stc: {
        method: 'iec60891-1',
        from,
        ...figures(r.figures, x.curve.meta.area_cm2),
        basis:
          `IEC 60891 procedure 1 on the measured curve, from ${fmt(from.temp_c)} °C and ${fmt(from.irradiance_w_m2, 0)} W/m² to 25 °C and 1000 W/m², ` +
          `with the batch's α ${pct(c.alpha_pct_per_k as number)} and β ${pct(c.beta_pct_per_k as number)} (${sig3(alpha_a_per_k)} A/K and ${sig3(beta_v_per_k)} V/K at the STC values), ` +
          `Rs ${sig3(rs)} Ω and κ ${sig3(kappa)} Ω/K.`,
        inputs: {
          ...window(),
          alpha_pct_per_k: c.alpha_pct_per_k as number,
          beta_pct_per_k: c.beta_pct_per_k as number,
          alpha_a_per_k,
          beta_v_per_k,
          rs_ohm: rs,
          kappa_ohm_per_k: kappa,
          isc1_a: x.metrics.isc_a,
          coefficients_from: 'the batch',
        },
        notes: [...notes, ...own, ...r.notes.filter((n) => !n.startsWith('IEC 60891 procedure 1 with'))],
      },
    };
  } catch (err) {
    return { ok: false, why: `IEC 60891 procedure 1 could not be applied (${err instanceof Error ? err.message : String(err)})` };
  }
}

/** The model's relative Voc and Pmax coefficients at STC, %/K (central difference over ±1 K). */
export function modelCoefficients(p25: SingleDiodeParams, cells: number, alpha_isc_a_per_k: number | undefined): { beta_pct_per_k: number; gamma_pct_per_k: number } {
  const at = (t: number) => {
    const tr = translateModel(p25, { cells, from: { ...STC }, to: { irradiance_w_m2: STC.irradiance_w_m2, temp_c: t }, alpha_isc_a_per_k, i0_law: MODEL_I0_LAW });
    return circuitFigures(singleDiodeCircuit(tr.params), cells, t);
  };
  const f0 = at(STC.temp_c);
  const up = at(STC.temp_c + 1);
  const down = at(STC.temp_c - 1);
  return { beta_pct_per_k: (100 * (up.voc_v - down.voc_v)) / 2 / f0.voc_v, gamma_pct_per_k: (100 * (up.pmp_w - down.pmp_w)) / 2 / f0.pmp_w };
}

function model(x: StcInput, from: StcFigures['from'], notes: string[]): Tried {
  if (!x.params) return { ok: false, why: 'the single-diode model is not available (its fit did not converge)' };
  const bad = x.flags.map((f) => FIT_QUALITY_FLAGS[f.code]).filter(Boolean);
  if (bad.length) return { ok: false, why: `the single-diode model fails its quality test: ${[...new Set(bad)].join('; ')}` };
  const p = x.params;
  if (p.n < PHYSICAL_IDEALITY.min || p.n > PHYSICAL_IDEALITY.max) {
    return { ok: false, why: `the single-diode model fails its quality test: n = ${Number(p.n.toPrecision(3))} per cell is outside ${PHYSICAL_IDEALITY.min}–${PHYSICAL_IDEALITY.max}` };
  }
  const c = x.coefficients ?? {};
  const alpha = finite(c.alpha_pct_per_k) ? (c.alpha_pct_per_k / 100) * p.iph_a : undefined;
  const dT = from.temp_c - STC.temp_c;
  try {
    const t = translateModel(p, { cells: x.cells, from, to: { ...STC }, alpha_isc_a_per_k: alpha, i0_law: MODEL_I0_LAW });
    const inputs: StcInputs = { ...window(), n: p.n, agreement_tolerance_pct: MODEL_AGREEMENT_PCT, model_temp_window_k: MODEL_TEMP_WINDOW_K };
    const checks: string[] = [];
    const given = { beta: finite(c.beta_pct_per_k) ? c.beta_pct_per_k : null, gamma: finite(c.gamma_pct_per_k) ? c.gamma_pct_per_k : null };
    if (given.beta !== null || given.gamma !== null) {
      const mc = modelCoefficients(t.params, x.cells, alpha);
      inputs.model_beta_pct_per_k = mc.beta_pct_per_k;
      inputs.model_gamma_pct_per_k = mc.gamma_pct_per_k;
      inputs.coefficients_from = 'the batch';
      for (const [name, mine, theirs, key] of [
        ['Voc', mc.beta_pct_per_k, given.beta, 'beta_pct_per_k'],
        ['Pmax', mc.gamma_pct_per_k, given.gamma, 'gamma_pct_per_k'],
      ] as const) {
        if (theirs === null) continue;
        inputs[key] = theirs;
        if (!(Math.abs(mine - theirs) <= (MODEL_AGREEMENT_PCT / 100) * Math.abs(theirs))) {
          return { ok: false, why: `the single-diode model's ${name} coefficient ${pct(mine)} disagrees with the batch's ${pct(theirs)} by more than ${MODEL_AGREEMENT_PCT} %, so its temperature behaviour is not the module's` };
        }
        checks.push(`its ${name} coefficient ${pct(mine)} agrees with the batch's ${pct(theirs)} within ${MODEL_AGREEMENT_PCT} %`);
      }
    } else if (Math.abs(dT) > MODEL_TEMP_WINDOW_K) {
      return {
        ok: false,
        why: `the single-diode model is used without the batch's β or γ to check it only within ±${MODEL_TEMP_WINDOW_K} K of 25 °C, and the curve was measured at ${fmt(from.temp_c)} °C`,
      };
    } else {
      checks.push(`measured within ±${MODEL_TEMP_WINDOW_K} K of 25 °C, so no temperature coefficient was needed to check it`);
    }
    const f = circuitFigures(singleDiodeCircuit(t.params), x.cells, STC.temp_c);
    return {
      ok: true,
      stc: {
        method: 'model',
        from,
        isc_a: f.isc_a,
        voc_v: f.voc_v,
        pmp_w: f.pmp_w,
        imp_a: f.imp_a,
        vmp_v: f.vmp_v,
        ff: f.ff,
        efficiency: efficiencyAtStc(f.pmp_w, x.curve.meta.area_cm2),
        basis:
          `The fitted single diode (n = ${sig3(p.n)} per cell, ${x.cells} cell${x.cells === 1 ? '' : 's'} in series) moved from ${fmt(from.temp_c)} °C and ${fmt(from.irradiance_w_m2, 0)} W/m² to 25 °C and 1000 W/m² ` +
          `(De Soto et al. 2006 scaling with I0 ∝ n_i^(2/n)); the fit passes its quality test and ${checks.join(' and ')}.`,
        inputs,
        notes: [...notes, ...t.notes],
      },
    };
  } catch (err) {
    return { ok: false, why: `the single-diode model could not be moved to STC (${err instanceof Error ? err.message : String(err)})` };
  }
}

/** The STC outcome of one analysed curve: the first method that holds, or why none does. */
export function stcOutcome(x: StcInput): StcOutcome {
  const notes: string[] = [];
  const meta = x.curve.meta;
  const irradiance_w_m2 = finite(meta.irradiance_w_m2) && meta.irradiance_w_m2 > 0 ? meta.irradiance_w_m2 : STC.irradiance_w_m2;
  if (irradiance_w_m2 !== meta.irradiance_w_m2) notes.push('No irradiance given (file or batch): the measurement was taken as 1000 W/m².');
  const temp_c = finite(meta.temp_c) ? meta.temp_c : STC.temp_c;
  if (temp_c !== meta.temp_c) notes.push('No cell temperature given: the measurement was taken as 25 °C.');
  const from = { irradiance_w_m2, temp_c };
  if (x.flags.some((f) => f.code === 'step')) {
    const absent: StcAbsent = {
      method: 'none',
      from,
      reason:
        'the curve has a step (a bypass diode conducting, mismatched or cracked cells). No translation describes such a curve, and its measured figures are not the module’s under uniform light; measure it again or inspect the module.',
      tried: [],
      notes,
    };
    return absent;
  }
  const tried: string[] = [];
  for (const method of [measured, procedure1, model]) {
    const r = method(x, from, notes);
    // A later method says why the earlier ones were not used (the measured window aside: the conditions say it).
    if (r.ok) return { ...r.stc, notes: [...tried.slice(1).map((why) => `Not used: ${why}.`), ...r.stc.notes] };
    tried.push(r.why);
  }
  return { method: 'none', from, reason: `no method holds for this curve (${tried.join('; ')}).`, tried, notes };
}
