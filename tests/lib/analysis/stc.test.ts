/**
 * STC figures only from a method that holds (lib/analysis/stc.ts): measured within the window,
 * IEC 60891 procedure 1 with the batch's coefficients, the fitted model only when it passes its
 * quality test and agrees with β and γ; otherwise no figures and the reason.
 *
 * Sources: the reference module and cell of Easwarakhanthan et al. (1986), Int. J. Solar Energy
 * 4:1–12 (tests/fixtures/reference-data, README: the module's true-current fit); the demo step
 * module (sample-data, invented); IEC 60891 procedure 1's equations as in lib/physics/translate.ts,
 * whose arithmetic tests/lib/physics/translate.test.ts checks on a worked example by hand. The
 * "true device" below is the reference module's fitted model moved in temperature by the n_i law
 * (lib/physics/fit-physics): procedure 1 never sees it, only the coefficients measured on it, so
 * its agreement with the true STC figures is an independent check of the procedure as applied here.
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { analyseFile } from '@/lib/analysis/analyse-file';
import type { FileAnalysis } from '@/lib/analysis/analyse-file';
import type { StcCoefficients } from '@/lib/analysis/stc';
import { simulateCurve } from '@/lib/iv/diode';
import type { SingleDiodeParams } from '@/lib/iv/types';
import { circuitFigures, paramsAtTemperature, singleDiodeCircuit, translateCurve } from '@/lib/physics';
import { stcFiguresOf } from '@/lib/schemas/curves';
import type { StcFigures } from '@/lib/schemas/curves';
import { REFERENCE_CELL, readReference } from '@/tests/support/reference-data';

const rel = (a: number, b: number) => Math.abs(a / b - 1);
const bytes = (text: string) => new TextEncoder().encode(text);
const STEP_FILE = path.resolve(__dirname, '../../../sample-data/batches/kf-m60-2611/M2611-015.csv');

// Reference-data README: 36-cell module, true-current single-diode fit at 45 °C, 1000 W/m².
const MODULE: SingleDiodeParams = { iph_a: 1.031434, i0_a: 2.6381e-6, n: 1.32217, rs_ohm: 1.235634, rsh_ohm: 821.64 };
const CELLS = 36;

/** The "true device" at temp_c and irradiance: the reference fit moved by the n_i law, Iph ∝ G. */
function device(temp_c: number, irradiance_w_m2 = 1000): SingleDiodeParams {
  const p = paramsAtTemperature(MODULE, temp_c, { cells: CELLS, fit_temp_c: 45 });
  return { ...p, iph_a: (p.iph_a * irradiance_w_m2) / 1000 };
}
const truthAt = (t: number) => circuitFigures(singleDiodeCircuit(device(t)), CELLS, t);
const TRUE_STC = truthAt(25);
/** The true device's relative coefficients at 25 °C, %/K (central difference over ±1 K). */
const TRUE = (() => {
  const up = truthAt(26);
  const down = truthAt(24);
  const d = (k: 'isc_a' | 'voc_v' | 'pmp_w') => (100 * (up[k] - down[k])) / 2 / TRUE_STC[k];
  return { alpha: d('isc_a'), beta: d('voc_v'), gamma: d('pmp_w') };
})();

/** A measured curve of the true device as a CSV file, sweeping past Voc by `over`. */
function measuredCsv(temp_c: number, irradiance_w_m2: number, over = 1.02): string {
  const p = device(temp_c, irradiance_w_m2);
  const sim = simulateCurve(p, { cells: CELLS, temp_c, points: 121 });
  const vMax = (over * sim.voltage_v[sim.voltage_v.length - 1]) / 1.02;
  const c = simulateCurve(p, { cells: CELLS, temp_c, points: 121, vMax });
  return 'V,I\n' + c.voltage_v.map((v, k) => `${v},${c.current_a[k]}`).join('\n') + '\n';
}

function analyse(csv: string, temp_c: number, irradiance_w_m2: number, coefficients: StcCoefficients = {}, cells = CELLS): FileAnalysis {
  return analyseFile(bytes(csv), { fileName: 'device.csv', overrides: { temp_c, irradiance_w_m2, cells }, defaults: { coefficients } });
}

describe('measured at STC: within ±2 °C and ±2 % the measured figures are the STC figures', () => {
  it.each([
    [25, 1000],
    [27, 1000],
    [23, 980],
    [25, 1020],
  ])('at %f °C and %f W/m² → method "measured", figures equal the measured key figures', (t, g) => {
    const r = analyse(measuredCsv(t, g), t, g);
    const stc = stcFiguresOf(r.stc)!;
    expect(stc.method).toBe('measured');
    for (const k of ['isc_a', 'voc_v', 'pmp_w', 'imp_a', 'vmp_v', 'ff'] as const) expect(stc[k]).toBe(r.metrics[k]);
    expect(stc.inputs).toMatchObject({ temp_tolerance_k: 2, irradiance_tolerance_pct: 2 });
    expect(stc.basis).toMatch(/within ±2 °C and ±2 %/);
  });

  it.each([
    [27.5, 1000],
    [25, 1030],
  ])('at %f °C and %f W/m² the measured figures are not taken as STC', (t, g) => {
    const r = analyse(measuredCsv(t, g), t, g);
    expect(r.stc.method).not.toBe('measured');
  });
});

describe('IEC 60891 procedure 1 with the batch’s coefficients', () => {
  it('from 45 °C, 1000 W/m²: agrees with the true device at STC (Isc, Voc within 0.5 %, Pmax within 2 % with κ = 0)', () => {
    const r = analyse(measuredCsv(45, 1000), 45, 1000, { alpha_pct_per_k: TRUE.alpha, beta_pct_per_k: TRUE.beta, rs_ohm: MODULE.rs_ohm, kappa_ohm_per_k: 0 });
    const stc = stcFiguresOf(r.stc)!;
    expect(stc.method).toBe('iec60891-1');
    expect(rel(stc.isc_a, TRUE_STC.isc_a)).toBeLessThan(0.005);
    expect(rel(stc.voc_v, TRUE_STC.voc_v)).toBeLessThan(0.005);
    // κ = 0 leaves the fill factor's own temperature change uncorrected: hence the wider bound on Pmax.
    expect(rel(stc.pmp_w, TRUE_STC.pmp_w)).toBeLessThan(0.02);
    expect(stc.inputs).toMatchObject({ alpha_pct_per_k: TRUE.alpha, beta_pct_per_k: TRUE.beta, rs_ohm: MODULE.rs_ohm, kappa_ohm_per_k: 0, coefficients_from: 'the batch' });
  });

  it('uses exactly the procedure’s equations (lib/physics/translate.ts) with the relative coefficients made absolute at the STC values', () => {
    // Invented coefficients: α +0.06 %/K, β −0.40 %/K, Rs 1.1 Ω, κ 0.004 Ω/K; measured at 40 °C, 850 W/m².
    const csv = measuredCsv(40, 850, 1.2);
    const r = analyse(csv, 40, 850, { alpha_pct_per_k: 0.06, beta_pct_per_k: -0.4, rs_ohm: 1.1, kappa_ohm_per_k: 0.004 });
    const stc = stcFiguresOf(r.stc)!;
    expect(stc.method).toBe('iec60891-1');
    // Written out by hand from the rule in lib/analysis/stc.ts: ΔT1 = 40 − 25 = 15 K;
    // Isc at STC ≈ Isc1·(1000/850)/(1 + 0.0006·15), Voc at STC ≈ Voc1/(1 − 0.004·15).
    const iscStc = (r.metrics.isc_a * (1000 / 850)) / 1.009;
    const vocStc = r.metrics.voc_v / 0.94;
    expect(stc.inputs?.alpha_a_per_k).toBeCloseTo(0.0006 * iscStc, 12);
    expect(stc.inputs?.beta_v_per_k).toBeCloseTo(-0.004 * vocStc, 12);
    const direct = translateCurve(r.curve, {
      method: 'iec60891-1',
      from: { irradiance_w_m2: 850, temp_c: 40 },
      to: { irradiance_w_m2: 1000, temp_c: 25 },
      alpha_a_per_k: 0.0006 * iscStc,
      beta_v_per_k: -0.004 * vocStc,
      rs_ohm: 1.1,
      kappa_ohm_per_k: 0.004,
    });
    expect(stc.pmp_w).toBeCloseTo(direct.figures!.pmp_w, 9);
    expect(stc.voc_v).toBeCloseTo(direct.figures!.voc_v, 9);
  });

  it('off 1000 W/m² it needs Rs: without it procedure 1 is not used, and the method that holds says why', () => {
    const r = analyse(measuredCsv(45, 800, 1.2), 45, 800, { alpha_pct_per_k: TRUE.alpha, beta_pct_per_k: TRUE.beta });
    const stc = stcFiguresOf(r.stc)!;
    // β is given and the model agrees with it, so the model holds.
    expect(stc.method).toBe('model');
    expect(stc.notes.join(' ')).toMatch(/Not used: IEC 60891 procedure 1 needs the internal series resistance Rs to correct from 800 W\/m²/);
    // With a β the model disagrees with, nothing holds, and the reason names both refusals.
    const none = analyse(measuredCsv(45, 800, 1.2), 45, 800, { alpha_pct_per_k: TRUE.alpha, beta_pct_per_k: -0.3 });
    expect(none.stc.method).toBe('none');
    expect(none.stc.method === 'none' && none.stc.reason).toMatch(/needs the internal series resistance Rs.*disagrees with the batch's −0\.3 %\/K/);
  });

  it('at 1000 W/m² Rs and κ may be missing: taken as 0 and said in the notes', () => {
    const r = analyse(measuredCsv(45, 1000), 45, 1000, { alpha_pct_per_k: TRUE.alpha, beta_pct_per_k: TRUE.beta });
    const stc = stcFiguresOf(r.stc)!;
    expect(stc.method).toBe('iec60891-1');
    expect(stc.notes.join(' ')).toMatch(/Rs not given: taken as 0 Ω/);
    expect(stc.notes.join(' ')).toMatch(/κ not given: taken as 0 Ω\/K/);
  });
});

describe('the fitted model only when its fit passes and its temperature behaviour agrees', () => {
  it('without coefficients: used within ±2 K of 25 °C (here 26 °C, 900 W/m², outside the irradiance window)', () => {
    const r = analyse(measuredCsv(26, 900), 26, 900);
    const stc = stcFiguresOf(r.stc)!;
    expect(stc.method).toBe('model');
    // The model is the true device's own law, so it lands on the true STC figures (the fit's
    // small Rsh ∝ 1/G scaling of De Soto et al. 2006 aside): within 0.5 %.
    expect(rel(stc.pmp_w, TRUE_STC.pmp_w)).toBeLessThan(0.005);
    expect(stc.basis).toMatch(/measured within ±2 K of 25 °C/);
  });

  it('without coefficients, 20 K from STC: no figures, and the reason says the model is used only within ±2 K', () => {
    const r = analyse(measuredCsv(45, 1000), 45, 1000);
    expect(r.stc.method).toBe('none');
    expect(r.stc.method === 'none' && r.stc.reason).toMatch(/only within ±2 K of 25 °C, and the curve was measured at 45\.0 °C/);
    expect(r.flags.map((f) => f.code)).toContain('stc-unavailable');
  });

  it('with β and γ the model agrees with (the true device’s): the model is used and its coefficients are shown', () => {
    const r = analyse(measuredCsv(45, 1000), 45, 1000, { beta_pct_per_k: TRUE.beta, gamma_pct_per_k: TRUE.gamma });
    const stc = stcFiguresOf(r.stc) as StcFigures;
    expect(stc.method).toBe('model');
    expect(Math.abs((stc.inputs?.model_beta_pct_per_k as number) / TRUE.beta - 1)).toBeLessThan(0.01);
    expect(rel(stc.pmp_w, TRUE_STC.pmp_w)).toBeLessThan(0.005);
  });

  it('with a β the model disagrees with by more than 25 %: no figures, the reason names both coefficients', () => {
    // β = −0.30 %/K (typical c-Si, common practice) against the model's about −0.50 %/K.
    const r = analyse(measuredCsv(45, 1000), 45, 1000, { beta_pct_per_k: -0.3 });
    expect(r.stc.method).toBe('none');
    expect(r.stc.method === 'none' && r.stc.reason).toMatch(/Voc coefficient −0\.49\d* %\/K disagrees with the batch's −0\.3 %\/K by more than 25 %/);
  });

  it('a fit that fails its quality test (wrong cell count) is never used, even at 25 °C off the irradiance window', () => {
    const r = analyse(measuredCsv(25, 900), 25, 900, {}, 60);
    expect(r.stc.method).toBe('none');
    expect(r.stc.method === 'none' && r.stc.reason).toMatch(/the single-diode model fails its quality test: .*the cell count does not match Voc/);
  });
});

describe('a curve with a step (the demo module M2611-015, bypass diode conducting; invented data)', () => {
  it.each([
    ['without coefficients', undefined],
    ['with the batch’s coefficients', { alpha_pct_per_k: 0.05, beta_pct_per_k: -0.29, gamma_pct_per_k: -0.37, rs_ohm: 0.35 }],
  ])('%s: no STC figures by any method, the reason says "step", a flag says so', (_l, coefficients) => {
    const r = analyseFile(new Uint8Array(readFileSync(STEP_FILE)), { fileName: 'M2611-015.csv', defaults: { coefficients } });
    // Measured at 24.4 °C and 1000 W/m² (the file): inside the window, yet the step rules it out.
    expect(r.curve.meta.temp_c).toBe(24.4);
    expect(r.stc.method).toBe('none');
    expect(r.stc.method === 'none' && r.stc.reason).toMatch(/the curve has a step/);
    const codes = r.flags.map((f) => f.code);
    expect(codes).toEqual(expect.arrayContaining(['step', 'poor-fit', 'ideality-unphysical', 'stc-unavailable']));
  });
});

describe('the reference cell (57 mm, 33 °C) with coefficients of its own kind', () => {
  it('procedure 1 comes before the model when α and β are given', () => {
    const r = analyseFile(bytes(readReference(REFERENCE_CELL)), {
      fileName: 'cell.csv',
      overrides: { temp_c: 33, irradiance_w_m2: 1000, cells: 1 },
      // Typical crystalline-silicon coefficients (common practice, docs/domain.md).
      defaults: { coefficients: { alpha_pct_per_k: 0.05, beta_pct_per_k: -0.35, gamma_pct_per_k: -0.45 } },
    });
    const stc = stcFiguresOf(r.stc)!;
    expect(stc.method).toBe('iec60891-1');
    // Cooling by 8 K with β −0.35 %/K raises Voc by about 0.35 %·8 = 2.8 % (±0.5 % for the Rs, κ = 0 terms).
    expect(Math.abs(stc.voc_v / r.metrics.voc_v - 1 - 0.028)).toBeLessThan(0.005);
  });
});
