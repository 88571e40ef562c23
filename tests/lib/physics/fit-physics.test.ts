import { thermal_voltage_v, ZERO_C_IN_K } from '@/lib/physics/constants';
import { circuitCurrent, circuitFigures, doubleDiodeCircuit, singleDiodeCircuit } from '@/lib/physics/diode';
import { PhysicsError } from '@/lib/physics/errors';
import {
  i0AtTemperature,
  impliedVocFromJ0,
  j0FromI0,
  predictVocVsTemperature,
  recombinationSharesAtMpp,
  vocTempCoefficient,
} from '@/lib/physics/fit-physics';
import { doubleDiodeCurrent, singleDiodeCurrent, singleDiodeVoltage } from '@/lib/iv/diode';
import type { DoubleDiodeParams, SingleDiodeParams } from '@/lib/iv/types';

const rel = (a: number, b: number) => Math.abs(a / b - 1);

/** Misiakos & Tsamakis (1993) n_i(T) fit, cm⁻³ (memory, checked in materials.test.ts). */
const niMT = (temp_k: number) => 5.29e19 * (temp_k / 300) ** 2.54 * Math.exp(-6726 / temp_k);

// Reference data README (tests/fixtures/reference-data): 36-cell module at 45 °C, true-current
// single-diode fit (n per cell).
const MODULE: SingleDiodeParams = { iph_a: 1.031434, i0_a: 2.6381e-6, n: 1.32217, rs_ohm: 1.235634, rsh_ohm: 821.64 };
// Same README: 57 mm cell at 33 °C, true-current fit; derived Isc 0.76026 A, Voc 0.57278 V, Pmp 0.31070 W.
const CELL: SingleDiodeParams = { iph_a: 0.760788, i0_a: 3.1068e-7, n: 1.47727, rs_ohm: 0.036547, rsh_ohm: 52.89 };

describe('the physics circuit layer against lib/iv (it maps the parameters onto lib/iv\'s solver)', () => {
  it('matches lib/iv singleDiodeCurrent (Lambert W) within 1e-10 A across the module curve', () => {
    for (let v = -1; v <= 18; v += 0.37) {
      expect(Math.abs(circuitCurrent(singleDiodeCircuit(MODULE), v, 36, 45) - singleDiodeCurrent(MODULE, v, 36, 45))).toBeLessThan(1e-10);
    }
  });

  it('reproduces the README figures of the cell fit: Isc 0.76026 A, Voc 0.57278 V, Pmp 0.31070 W (5 digits)', () => {
    const f = circuitFigures(singleDiodeCircuit(CELL), 1, 33);
    expect(f.isc_a).toBeCloseTo(0.76026, 5);
    expect(f.voc_v).toBeCloseTo(0.57278, 5);
    expect(f.pmp_w).toBeCloseTo(0.3107, 5);
  });
});

describe('J0 and the temperature law of I0', () => {
  it('J0 = I0/A per cell (definition): 2.6381e-6 A over a 100 cm² cell is 2.6381e-8 A/cm²', () => {
    expect(j0FromI0(2.6381e-6, 100)).toBeCloseTo(2.6381e-8, 20);
    expect(() => j0FromI0(2.6381e-6, 0)).toThrow(/cell_area_cm2/);
  });

  // I0(T) ∝ n_i(T)^(2/n) (DOMAIN.md) with n_i from Misiakos & Tsamakis (1993) instead of the
  // library's Couderc et al. (2014): two sources, agreement within 2 % over 25 → 60 °C.
  it.each([1, 1.32217, 2])('n = %f: I0(60 °C)/I0(25 °C) follows (n_i ratio)^(2/n) with Misiakos–Tsamakis n_i within 2 %', (n) => {
    const ratio = i0AtTemperature(1e-9, n, 25, 60) / 1e-9;
    const expected = (niMT(60 + ZERO_C_IN_K) / niMT(25 + ZERO_C_IN_K)) ** (2 / n);
    expect(rel(ratio, expected)).toBeLessThan(0.02);
  });

  // De Soto et al. (2006), by hand: T1 = 318.15 K, T2 = 298.15 K, Eg1 = 1.121 eV,
  // Eg2 = 1.121·(1 − 0.0002677·(−20)) = 1.121·1.005354 = 1.127001834 eV,
  // ln ratio = 3·ln(298.15/318.15) + (1.121/318.15 − 1.127001834/298.15)/k_B
  //          = 3·(−0.0649263) + (0.00352350 − 0.00377998)/8.617333e-5
  //          = −0.194779 − 2.976413 = −3.171192  (k_B = 8.617333e-5 eV/K, CODATA 2018).
  it('law "desoto" reproduces the hand-computed ratio exp(−3.17119) from 45 °C to 25 °C', () => {
    const ratio = i0AtTemperature(1, 1.3, 45, 25, { law: 'desoto' });
    expect(Math.log(ratio)).toBeCloseTo(-3.171192, 5);
  });

  it('rejects a non-physical temperature and an unknown law, naming them', () => {
    expect(() => i0AtTemperature(1e-9, 1, 25, -300)).toThrow(/temp_c/);
    expect(() => i0AtTemperature(1e-9, 1, 25, 30, { law: 'x' as 'desoto' })).toThrow(/law/);
  });
});

describe('Voc temperature coefficient of a fitted device', () => {
  // Closed-form check with an independent n_i(T) (Misiakos & Tsamakis 1993):
  // Voc ≈ n·Ns·Vt·ln(Iph/I0) ⇒ dVoc/dT ≈ Voc/T + n·Ns·Vt·(α − (2/n)·d ln n_i/dT),
  // d ln n_i/dT = 2.54/T + 6726/T². The shunt is neglected, hence the 2 % tolerance.
  it('reference 36-cell module at 45 °C: dVoc/dT matches the closed form with Misiakos–Tsamakis n_i within 2 %', () => {
    const result = vocTempCoefficient(MODULE, { cells: 36, temp_c: 45 });
    const t = 45 + ZERO_C_IN_K;
    const a = MODULE.n * 36 * thermal_voltage_v(45);
    const closedForm = result.voc_v / t + a * (0.0005 - (2 / MODULE.n) * (2.54 / t + 6726 / t ** 2));
    expect(rel(result.beta_v_per_k, closedForm)).toBeLessThan(0.02);
  });

  // Common practice: crystalline silicon Voc ≈ −0.3 %/K (DOMAIN.md, common practice). That figure
  // belongs to modern cells near 0.65–0.70 V. This 1986 module's cells reach only 0.47 V, and
  // dVoc/dT ≈ −(Eg/q − Voc_cell)/T per cell makes its relative coefficient larger: measured
  // −0.556 %/K (ni-power law) and −0.84 %/K (De Soto law). We therefore assert the band
  // [−0.6, −0.3] %/K for the default law, and the −0.3 %/K itself on a modern cell below.
  it('reference module: β_Voc lies between −0.6 and −0.3 %/K (common practice −0.3 %/K, see comment)', () => {
    const result = vocTempCoefficient(MODULE, { cells: 36, temp_c: 45 });
    expect(result.beta_pct_per_k).toBeLessThan(-0.3);
    expect(result.beta_pct_per_k).toBeGreaterThan(-0.6);
    expect(result.law).toBe('ni-power');
    const deSoto = vocTempCoefficient(MODULE, { cells: 36, temp_c: 45, law: 'desoto' });
    expect(deSoto.beta_pct_per_k).toBeLessThan(result.beta_pct_per_k);
  });

  // A modern cell (n = 1, Voc = 0.680 V at 25 °C, Isc 9.5 A) lands on the common-practice
  // −0.3 %/K (common practice) and −2.0 mV/K per cell (common practice) within ±0.04 %/K.
  it('modern cell with Voc 0.68 V: β_Voc = −0.30 ± 0.04 %/K (common practice)', () => {
    const iph = 9.5;
    const modern: SingleDiodeParams = { iph_a: iph, i0_a: iph / Math.exp(0.68 / thermal_voltage_v(25)), n: 1, rs_ohm: 0.003, rsh_ohm: 300 };
    const result = vocTempCoefficient(modern, { cells: 1, temp_c: 25 });
    expect(Math.abs(result.beta_pct_per_k - -0.3)).toBeLessThan(0.04);
    expect(Math.abs(result.beta_per_cell_v_per_k - -0.002)).toBeLessThan(0.0003);
  });

  it('Voc across temperature starts from the fitted Voc (lib/iv Lambert W) and falls steadily', () => {
    const series = predictVocVsTemperature(MODULE, { cells: 36, fit_temp_c: 45, from_c: -10, to_c: 80, step_c: 5 });
    const at45 = series.points.find((p) => p.temp_c === 45);
    expect(at45).toBeDefined();
    expect(rel(at45!.voc_v, singleDiodeVoltage(MODULE, 0, 36, 45))).toBeLessThan(1e-9);
    for (let k = 1; k < series.points.length; k++) expect(series.points[k].voc_v).toBeLessThan(series.points[k - 1].voc_v);
    expect(series.points).toHaveLength(19);
  });

  it('rejects a bad temperature step, naming it', () => {
    expect(() => predictVocVsTemperature(MODULE, { cells: 36, fit_temp_c: 45, step_c: 0 })).toThrow(PhysicsError);
    expect(() => predictVocVsTemperature(MODULE, { cells: 36, fit_temp_c: 45, step_c: 0 })).toThrow(/step_c/);
  });
});

describe('implied Voc from Jsc and J0', () => {
  // By hand: Vt(25 °C) = 1.380649e-23·298.15/1.602176634e-19 = 0.025692579 V;
  // ln(0.040/1e-13 + 1) = ln(4.00000000001e11) = 26.71486; Voc = 0.025692579·26.71486 = 0.686374 V.
  it('Jsc 40 mA/cm², J0 100 fA/cm², n = 1, 25 °C → 0.68637 V (hand arithmetic)', () => {
    expect(impliedVocFromJ0({ jsc_a_cm2: 0.04, j0_a_cm2: 1e-13, temp_c: 25 })).toBeCloseTo(0.686374, 5);
  });

  it.each([
    [{ jsc_a_cm2: -1, j0_a_cm2: 1e-13, temp_c: 25 }, 'jsc_a_cm2'],
    [{ jsc_a_cm2: 0.04, j0_a_cm2: 0, temp_c: 25 }, 'j0_a_cm2'],
    [{ jsc_a_cm2: 0.04, j0_a_cm2: 1e-13, temp_c: -400 }, 'temp_c'],
  ])('rejects %j naming %s', (input, name) => {
    expect(() => impliedVocFromJ0(input)).toThrow(new RegExp(name));
  });
});

describe('double-diode recombination shares at the maximum power point', () => {
  const dd: DoubleDiodeParams = { iph_a: 0.7608, i01_a: 2e-10, n1: 1, i02_a: 5e-7, n2: 2, rs_ohm: 0.036, rsh_ohm: 55 };

  it('the branch currents add up (Kirchhoff) and the MPP current matches lib/iv doubleDiodeCurrent', () => {
    const s = recombinationSharesAtMpp(dd, { cells: 1, temp_c: 33 });
    expect(Math.abs(dd.iph_a - s.diode1_a - s.diode2_a - s.shunt_a - s.imp_a)).toBeLessThan(1e-12);
    expect(Math.abs(doubleDiodeCurrent(dd, s.vmp_v, 1, 33) - s.imp_a)).toBeLessThan(1e-10);
    expect(s.depletion_share + s.diffusion_share).toBeCloseTo(1, 14);
    expect(circuitFigures(doubleDiodeCircuit(dd), 1, 33).vmp_v).toBeCloseTo(s.vmp_v, 12);
  });

  it('is the MPP: power from lib/iv is lower 5 mV either side', () => {
    const s = recombinationSharesAtMpp(dd, { cells: 1, temp_c: 33 });
    const p = (v: number) => v * doubleDiodeCurrent(dd, v, 1, 33);
    expect(p(s.vmp_v)).toBeGreaterThan(p(s.vmp_v - 0.005));
    expect(p(s.vmp_v)).toBeGreaterThan(p(s.vmp_v + 0.005));
  });

  // Diode 2 with n2 = 2 grows as exp(V/2Vt), diode 1 as exp(V/Vt): the depletion share must
  // fall as diode 1's saturation current rises (physics of the two paths).
  it('a larger diffusion saturation current lowers the depletion-region share', () => {
    const low = recombinationSharesAtMpp(dd, { cells: 1, temp_c: 33 });
    const high = recombinationSharesAtMpp({ ...dd, i01_a: 2e-9 }, { cells: 1, temp_c: 33 });
    expect(high.depletion_share).toBeLessThan(low.depletion_share);
  });

  it('rejects unphysical parameters, naming them', () => {
    expect(() => recombinationSharesAtMpp({ ...dd, i02_a: -1 }, { cells: 1, temp_c: 33 })).toThrow(/i02_a/);
    expect(() => recombinationSharesAtMpp(dd, { cells: 0, temp_c: 33 })).toThrow(/cells/);
  });
});
