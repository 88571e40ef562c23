/**
 * The characterisation engine against references outside it: a least-squares line worked by hand,
 * the invented module of ./synthetic.ts (its own diode solver), curves made by the IEC 60891
 * procedure 1 equations written out here, and the matrix's reading of its own measured points.
 */
import { characterise } from '@/lib/analysis/characterise';
import type { Characterisation, CharCurve } from '@/lib/analysis/characterise';
import { fitLine } from '@/lib/analysis/characterise/regression';
import { temperatureCoefficients } from '@/lib/analysis/characterise/coefficients';
import { iec60891Parameters } from '@/lib/analysis/characterise/iec60891-params';
import { interpolateMatrix, MATRIX_IRRADIANCES_W_M2, MATRIX_TEMPS_C } from '@/lib/analysis/characterise/matrix';
import type { MatrixCell } from '@/lib/analysis/characterise/matrix';
import { keyFigures } from '@/lib/iv/key-figures';
import { MODULE, synthCurve, truthCurrent, truthPmax, truthVoc } from './synthetic';

describe('least-squares line (worked by hand)', () => {
  it('matches the hand computation on invented points', () => {
    // Invented: Isc 9.10, 9.15, 9.26, 9.38 A at 15, 25, 50, 75 °C.
    // x̄ = 41.25, ȳ = 9.2225; Sxx = 26.25² + 16.25² + 8.75² + 33.75² = 2168.75;
    // Sxy = 26.25·0.1225 + 16.25·0.0725 + 8.75·0.0375 + 33.75·0.1575 = 10.0375;
    // slope = 10.0375/2168.75 = 0.0046282 A/K; intercept = 9.2225 − 0.0046282·41.25 = 9.031585 A;
    // SSE = 1.9020e-5 → s² = SSE/2, se(slope) = √(s²/Sxx) = 6.622e-5; R² = 1 − SSE/Syy = 0.999591;
    // relative at 25 °C: 100·0.0046282/(9.031585 + 25·0.0046282) = 0.050597 %/K.
    const f = fitLine([15, 25, 50, 75], [9.1, 9.15, 9.26, 9.38]);
    expect(f.slope).toBeCloseTo(0.0046282, 7);
    expect(f.intercept).toBeCloseTo(9.031585, 6);
    expect(f.slope_se).toBeCloseTo(6.622e-5, 8);
    expect(f.r2).toBeCloseTo(0.999591, 6);
    const curves: CharCurve[] = [15, 25, 50, 75].map((t, k) => ({
      id: `c${k}`,
      irradiance_w_m2: 1000,
      temp_c: t,
      voltage_v: [],
      current_a: [],
      metrics: { isc_a: [9.1, 9.15, 9.26, 9.38][k], voc_v: 40, pmp_w: 300, imp_a: 8, vmp_v: 37.5, ff: 0.8 },
    }));
    const c = temperatureCoefficients(curves);
    if ('error' in c) throw new Error(c.error);
    expect(c.alpha.pct_per_k).toBeCloseTo(0.050597, 5);
    expect(c.span_k).toBe(60);
  });

  it('refuses too few temperatures or too small a span, saying the rule', () => {
    const at = (t: number, g = 1000): CharCurve => ({ id: `t${t}`, irradiance_w_m2: g, temp_c: t, voltage_v: [], current_a: [], metrics: { isc_a: 9, voc_v: 40, pmp_w: 300, imp_a: 8, vmp_v: 37.5, ff: 0.8 } });
    const two = temperatureCoefficients([at(25), at(50), at(25.5)]);
    expect('error' in two && two.error).toMatch(/at least 3 curves at 3 different cell temperatures/);
    const narrow = temperatureCoefficients([at(25), at(30), at(35), at(40)]);
    expect('error' in narrow && narrow.error).toMatch(/spanning at least 20 K.*span 15\.0 K/);
    // Three temperatures at three different irradiances are not one irradiance.
    const spread = temperatureCoefficients([at(25, 1000), at(50, 800), at(75, 600)]);
    expect('error' in spread).toBe(true);
    expect(characterise([at(25), at(50)])).toEqual({ error: expect.stringMatching(/at least 3 curves/) });
  });
});

/** The invented module measured at part of the IEC 61853-1 grid. */
function invented(): CharCurve[] {
  const set: CharCurve[] = [];
  for (const t of [15, 25, 50, 75]) set.push(synthCurve(1000, t));
  for (const g of [100, 200, 400, 600, 800]) set.push(synthCurve(g, 25));
  set.push(synthCurve(200, 50), synthCurve(1100, 75));
  return set;
}

describe('characterisation of an invented module (independent diode model)', () => {
  let r: Characterisation;
  beforeAll(() => {
    const out = characterise(invented(), { device: 'invented' });
    if ('error' in out) throw new Error(out.error);
    r = out;
  });

  it('finds the coefficients the model has', () => {
    // α: the model's Iph rises 0.05 %/K; Isc follows it (Rs/Rsh change it by far less than 0.001 %/K).
    expect(r.alpha_isc_pct_per_k).toBeCloseTo(MODULE.alpha_rel_per_k * 100, 4);
    // β and γ: the model's own chord slopes over 15–75 °C at 1000 W/m² (its Voc and Pmax by bisection and golden section).
    const beta = (100 * (truthVoc(1000, 75) - truthVoc(1000, 15))) / 60 / truthVoc(1000, 25);
    const gamma = (100 * (truthPmax(1000, 75) - truthPmax(1000, 15))) / 60 / truthPmax(1000, 25);
    expect(r.beta_voc_pct_per_k).toBeCloseTo(beta, 2);
    expect(Math.abs(r.gamma_pmp_pct_per_k / gamma - 1)).toBeLessThan(0.02);
    expect(r.stderr.beta_voc_pct_per_k).toBeGreaterThan(0);
    expect(r.stderr.beta_voc_pct_per_k!).toBeLessThan(0.01);
    expect(r.regression.span_k).toBe(60);
  });

  it('determines procedure 1 Rs near the model series resistance, with a small residual', () => {
    const p1 = r.iec60891.procedure1;
    if ('error' in p1) throw new Error(p1.error);
    expect(Math.abs(p1.rs_ohm / MODULE.rs_ohm - 1)).toBeLessThan(0.03);
    expect(p1.rs_residual_pct).toBeLessThan(0.05);
    expect(p1.kappa_residual_pct).toBeLessThan(0.1);
    const p2 = r.iec60891.procedure2;
    if ('error' in p2) throw new Error(p2.error);
    // a ≈ n·Ns·kT/q / Voc for a diode (Voc ∝ ln G): 1.1·60·0.025693/41.58 = 0.0408.
    expect(p2.a_irradiance).toBeGreaterThan(0.035);
    expect(p2.a_irradiance).toBeLessThan(0.047);
  });

  it('reproduces the measured points it was built from and stays within 1 % of the model elsewhere', () => {
    const set = invented();
    for (const c of r.matrix) {
      if (c.source === 'measured') {
        const src = set.find((s) => s.id === c.curve)!;
        expect(c.pmp_w).toBe(src.metrics.pmp_w);
        expect(c.voc_v).toBe(src.metrics.voc_v);
      }
      expect(Math.abs(c.pmp_w / truthPmax(c.irradiance_wm2, c.temp_c) - 1)).toBeLessThan(0.01);
      expect(Math.abs(c.voc_v / truthVoc(c.irradiance_wm2, c.temp_c) - 1)).toBeLessThan(0.005);
    }
    expect(r.matrix.filter((c) => c.source === 'translated').length).toBeGreaterThan(0);
    // Never extrapolated: nothing at 15 °C below the lowest measured irradiance there, nothing at 1100 W/m² and 25 °C.
    expect(r.matrix.find((c) => c.irradiance_wm2 === 100 && c.temp_c === 15)).toBeUndefined();
    expect(r.not_covered.find((c) => c.irradiance_wm2 === 1100 && c.temp_c === 25)?.reason).toMatch(/no extrapolation/);
    expect(r.stc?.pmp_w).toBeCloseTo(truthPmax(1000, 25), 0);
    const low = r.efficiency.find((e) => e.irradiance_wm2 === 200)!;
    expect(low.relative_efficiency_pct).toBeCloseTo((100 * (truthPmax(200, 25) / 200)) / (truthPmax(1000, 25) / 1000), 0);
  });
});

describe('IEC 60891 procedure 1 parameters from curves made by the procedure itself', () => {
  it('recovers the Rs and κ the curves were made with', () => {
    // IEC 60891 procedure 1, written out here: I2 = I1 + Isc1·(G2/G1 − 1) + α·ΔT,
    // V2 = V1 − Rs·(I2 − I1) − κ·I2·ΔT + β·ΔT. Curves are made from one reference curve at
    // 1000 W/m² and 25 °C (the invented module) with invented Rs = 0.5 Ω, κ = 0.002 Ω/K, β = −0.12 V/K
    // and α = 0 (then Voc moves by exactly β·ΔT, so the regression returns β itself).
    const ref = synthCurve(1000, 25);
    const rs = 0.5;
    const kappa = 0.002;
    const beta = -0.12;
    const make = (g: number, t: number): CharCurve => {
      const dT = t - 25;
      const isc1 = ref.metrics.isc_a;
      const current_a = ref.current_a.map((i1) => i1 + isc1 * (g / 1000 - 1));
      const voltage_v = ref.voltage_v.map((v1, k) => v1 - rs * (current_a[k] - ref.current_a[k]) - kappa * current_a[k] * dT + beta * dT);
      const m = keyFigures({ voltage_v: voltage_v.map((v) => v), current_a, meta: {}, notes: [] }).metrics;
      // The moved curve starts above 0 V at lower irradiance, so its Isc is the equation's own: Isc1·G2/G1.
      return { id: `P${g}-${t}`, irradiance_w_m2: g, temp_c: t, voltage_v, current_a, metrics: { ...m, isc_a: isc1 * (g / 1000), ff: m.pmp_w / (isc1 * (g / 1000) * m.voc_v) } };
    };
    const set = [ref, make(800, 25), make(600, 25), make(400, 25), make(1000, 50), make(1000, 75), make(1000, 15)];
    const coeff = temperatureCoefficients(set);
    if ('error' in coeff) throw new Error(coeff.error);
    expect(coeff.beta.per_k).toBeCloseTo(beta, 3);
    const p = iec60891Parameters(set, coeff).procedure1;
    if ('error' in p) throw new Error(p.error);
    expect(p.rs_ohm).toBeCloseTo(rs, 2);
    expect(p.kappa_ohm_per_k).toBeCloseTo(kappa, 4);
    expect(p.rs.residual_pct).toBeLessThan(0.02);
  });
});

describe('matrix reading between grid points', () => {
  it('is exact for a quantity bilinear in G and T and refuses outside the grid', () => {
    // Invented bilinear figures: f(G, T) = 2 + 0.3·G − 0.4·T + 0.001·G·T.
    const f = (g: number, t: number) => 2 + 0.3 * g - 0.4 * t + 0.001 * g * t;
    const cells: MatrixCell[] = [];
    for (const g of MATRIX_IRRADIANCES_W_M2) for (const t of MATRIX_TEMPS_C) cells.push({ irradiance_wm2: g, temp_c: t, pmp_w: f(g, t), voc_v: f(g, t) / 10, isc_a: g / 100, ff_pct: 75, source: 'measured', curve: 'x', procedure: null });
    const at = interpolateMatrix(cells, 500, 37.5);
    if ('error' in at) throw new Error(at.error);
    expect(at.pmp_w).toBeCloseTo(f(500, 37.5), 9);
    expect(at.isc_a).toBeCloseTo(5, 9);
    const onGrid = interpolateMatrix(cells, 1000, 25);
    expect('error' in onGrid ? NaN : onGrid.pmp_w).toBeCloseTo(f(1000, 25), 9);
    expect(interpolateMatrix(cells, 1200, 25)).toEqual({ error: expect.stringMatching(/outside the matrix grid/) });
    expect(interpolateMatrix(cells.filter((c) => !(c.irradiance_wm2 === 600 && c.temp_c === 50)), 500, 37.5)).toEqual({ error: expect.stringMatching(/no figures at every grid point/) });
  });
});

it('the invented module is what it says (Voc by its own bisection is where its current is 0)', () => {
  expect(Math.abs(truthCurrent(truthVoc(1000, 25), 1000, 25))).toBeLessThan(1e-9);
});
