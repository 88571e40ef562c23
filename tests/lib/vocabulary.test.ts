/**
 * The key table (lib/vocabulary.ts) must name every quantity the engine hands out: the test walks
 * real outputs — an analysed demo file, the physics results, a translation, a string sizing — and
 * fails for any numeric key the table does not know. Expected strings are worked by hand from the
 * table's rules (significant digits, fixed decimals for percentages).
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { analyseFile } from '@/lib/analysis/analyse-file';
import { compareFits } from '@/lib/analysis/compare-fits';
import {
  bandDiagram,
  carrierDensities,
  circuitBranchCurrents,
  circuitFigures,
  doubleDiodeCircuit,
  equilibrium,
  materialAt,
  occupationCurve,
  predictVocVsTemperature,
  quasiFermiLevels,
  recombinationSharesAtMpp,
  singleDiodeCircuit,
  translateCurve,
  vocTempCoefficient,
} from '@/lib/physics';
import { PARAM_KEYS } from '@/lib/quality/params';
import { stringSizeSchema } from '@/lib/schemas/strings';
import { betaVocFromMeasurements, sizeString, worstModule } from '@/lib/strings/size-string';
import { formatValue, isKnownKey, labelWithUnit, QUANTITIES, quantity, toShown, unitOf } from '@/lib/vocabulary';
import { singleDiodeParamsOf } from '@/lib/iv/fit-params';
import { characterise } from '@/lib/analysis/characterise';
import { synthCurve } from '@/tests/lib/analysis/characterise/synthetic';

const DEMO = path.resolve(__dirname, '../../sample-data/batches/kf-c24-cells/KF-C24-0001.csv');

/** Numeric keys of a JSON-like value, with where they are. */
function numericKeys(value: unknown, out: { key: string; at: string }[] = [], at = '$'): typeof out {
  if (Array.isArray(value)) {
    value.forEach((v, i) => {
      if (v !== null && typeof v === 'object') numericKeys(v, out, `${at}[${i}]`);
    });
    return out;
  }
  if (value === null || typeof value !== 'object') return out;
  for (const [key, v] of Object.entries(value)) {
    const numeric = typeof v === 'number' || (Array.isArray(v) && v.length > 0 && v.every((x) => typeof x === 'number'));
    // Standard errors are keyed like the parameters they belong to.
    if (numeric) out.push({ key, at: `${at}.${key}` });
    else numericKeys(v, out, `${at}.${key}`);
  }
  return out;
}

function unknownKeys(value: unknown): string[] {
  return numericKeys(value)
    .filter(({ key }) => !isKnownKey(key))
    .map((k) => k.at);
}

describe('every key the engine hands out is in the table', () => {
  const analysis = analyseFile(readFileSync(DEMO), { fileName: 'KF-C24-0001.csv', overrides: { irradiance_w_m2: 1000, area_cm2: 243 } });
  const single = analysis.fits.find((f) => f.model === 'single-diode');
  const double = analysis.fits.find((f) => f.model === 'double-diode');
  const params = singleDiodeParamsOf(single);
  const dd = { iph_a: 0.7608, i01_a: 2e-10, n1: 1, i02_a: 5e-7, n2: 2, rs_ohm: 0.036, rsh_ohm: 55 };

  it('an analysed demo file: curve, metadata, key figures, fits, STC figures, conditions', () => {
    expect(analysis.fits.every((f) => f.converged)).toBe(true);
    expect(analysis.stc).not.toBeNull();
    expect(unknownKeys(analysis)).toEqual([]);
    expect(unknownKeys(compareFits(single, double))).toEqual([]);
  });

  it('physics: material, carriers, band diagram, occupation, fitted-device physics, circuits', () => {
    expect(params).not.toBeNull();
    const p = params!;
    const injection = { type: 'p' as const, doping_cm3: 1e16, temp_k: 300, excess_cm3: 1e15 };
    const diagram = bandDiagram(injection);
    const outputs = {
      material: materialAt(300),
      densities: carrierDensities(0.1, 300),
      equilibrium: equilibrium({ type: 'n', doping_cm3: 1e17, temp_k: 300 }),
      quasi: quasiFermiLevels(injection),
      diagram,
      occupation: occupationCurve(diagram, { points: 5 }),
      coefficient: vocTempCoefficient(p, { cells: 1, temp_c: 25 }),
      series: predictVocVsTemperature(p, { cells: 1, fit_temp_c: 25, from_c: 0, to_c: 50, step_c: 25 }),
      shares: recombinationSharesAtMpp(dd, { cells: 1, temp_c: 25 }),
      figures: circuitFigures(singleDiodeCircuit(p), 1, 25),
      branches: circuitBranchCurrents(doubleDiodeCircuit(dd), 0.5, 1, 25),
      translation: translateCurve(analysis.curve, { method: 'model', params: p, cells: 1, from: { irradiance_w_m2: 1000, temp_c: 25 }, to: { irradiance_w_m2: 800, temp_c: 45 } }),
    };
    expect(unknownKeys(outputs)).toEqual([]);
  });

  it('string sizing: the request and the answer', () => {
    const request = stringSizeSchema.parse({ voc_stc_v: '49.5', beta_voc_pct_per_k: '-0.29', t_min_c: '-15', t_cell_max_c: '70', v_sys_v: '1500', vmp_stc_v: '41', beta_vmp_pct_per_k: '-0.37', mpp_window_min_v: '500', mpp_window_max_v: '1300' });
    const answer = sizeString({ ...request, voc_stc_v: request.voc_stc_v as number, beta_voc_pct_per_k: request.beta_voc_pct_per_k as number });
    const worst = worstModule([{ device_id: 'a', voc_v: 49.5 }, { device_id: 'b', voc_v: 49.1 }]);
    expect(unknownKeys({ request, answer, worst })).toEqual([]);
    // The point count is `points` (not `n`, the ideality factor's key).
    const beta = betaVocFromMeasurements([{ temp_c: 15, voc_v: 50 }, { temp_c: 35, voc_v: 47.2 }, { temp_c: 55, voc_v: 44.4 }]);
    expect(unknownKeys(beta)).toEqual([]);
  });

  it('characterisation: coefficients, IEC 60891 parameters, matrix, efficiency', () => {
    const set = [...[15, 25, 50, 75].map((t) => synthCurve(1000, t)), ...[200, 400, 600].map((g) => synthCurve(g, 25))];
    const r = characterise(set);
    expect('error' in r).toBe(false);
    expect(unknownKeys(r)).toEqual([]);
  });

  it('the parameter keys of limits and statistics are all there', () => {
    for (const k of PARAM_KEYS) expect(quantity(k)?.key).toBe(k);
  });

  it('a key the table does not know is reported by the walk (the test can fail)', () => {
    expect(unknownKeys({ metrics: { isc_a: 1, new_figure_x: 2 } })).toEqual(['$.metrics.new_figure_x']);
  });
});

describe('the table itself', () => {
  it('every key is snake_case and every entry has a label; each name is defined once', () => {
    const names = new Set<string>();
    for (const x of QUANTITIES) {
      expect(x.key).toMatch(/^[a-z][a-z0-9]*(_[a-z0-9]+)*$/);
      expect(x.label.trim()).not.toBe('');
      expect(names.has(x.key)).toBe(false);
      names.add(x.key);
    }
  });

  it('a unit suffix agrees with the unit shown (or stored, for fractions)', () => {
    // Most specific suffix first; the first that matches decides.
    const suffix: [RegExp, (unit: string) => boolean][] = [
      [/_per_k$/, (u) => u.endsWith('/K')],
      [/_a_cm2$/, (u) => u === 'A/cm²'],
      [/_cm3_s$/, (u) => u === 'cm⁻³·s⁻¹'],
      [/_w_m2$/, (u) => u === 'W/m²'],
      [/_cm3$/, (u) => u === 'cm⁻³'],
      [/_cm2$/, (u) => u === 'cm²'],
      [/_ohm$/, (u) => u === 'Ω'],
      [/_ev$/, (u) => u === 'eV'],
      [/_ms$/, (u) => u === 'ms'],
      [/_pct$/, (u) => u === '%'],
      [/_a$/, (u) => u === 'A'],
      [/_v$/, (u) => u === 'V'],
      [/_w$/, (u) => u === 'W'],
      [/_c$/, (u) => u === '°C'],
      [/_k$/, (u) => u === 'K'],
      [/_s$/, (u) => u === 's'],
    ];
    for (const x of QUANTITIES) {
      const rule = suffix.find(([re]) => re.test(x.key));
      if (rule) expect({ key: x.key, agrees: rule[1](x.unit) || rule[1](x.storedUnit) }).toEqual({ key: x.key, agrees: true });
    }
  });

  it('one name per quantity: no entry carries another name (no wire aliases), old names are gone', () => {
    // An entry's fields are exactly these; a `wire` (or any other alias list) fails here.
    const fields = ['key', 'label', 'unit', 'storedUnit', 'scale', 'decimals', 'digits', 'group'].sort();
    for (const x of QUANTITIES) expect({ key: x.key, fields: Object.keys(x).sort() }).toEqual({ key: x.key, fields });
    // A sample of the names used before the renaming (tempC, egDos_eV, …): none is a key any more.
    for (const old of ['tempC', 'irradiance_Wm2', 'voc_V', 'egDos_eV', 'gap_eV', 'impliedVoc_V', 'boltzmannError.n', 'meanPmp_w', 'vocStc_V', 'equilibrium']) {
      expect(quantity(old)).toBeUndefined();
    }
    expect(quantity('temp_c')?.label).toBe('Cell temperature');
    expect(quantity('n')?.key).toBe('n');
  });
});

describe('formatValue, labelWithUnit, toShown', () => {
  it.each([
    ['isc_a', 0.76026, '0.7603 A'],
    ['voc_v', 49.374, '49.37 V'],
    ['ff', 0.71349, '71.3 %'], // fraction → % with 1 decimal
    ['efficiency', 0.2153, '21.53 %'],
    ['i0_a', 3.1068e-7, '3.107×10⁻⁷ A'],
    ['n', 1.47727, '1.477'],
    ['temp_c', 33.5, '33.5 °C'],
    ['ni_cm3', 9.65e9, '9.650×10⁹ cm⁻³'],
    ['cells', 60, '60'],
    ['depletion_share', 0.1234, '12.3 %'],
    ['unknown_key', 2.5, '2.5'],
  ])('formatValue(%s, %p) = %s', (key, value, out) => {
    expect(formatValue(key, value)).toBe(out);
  });

  it('missing and non-finite values show as —', () => {
    for (const v of [null, undefined, Number.NaN, Number.POSITIVE_INFINITY]) expect(formatValue('isc_a', v)).toBe('—');
  });

  it('digits override significant digits, not fixed decimals', () => {
    expect(formatValue('rs_ohm', 0.036547, 3)).toBe('0.0365 Ω');
    expect(formatValue('ff', 0.71349, 3)).toBe('71.3 %');
  });

  it.each([
    ['isc_a', 'Isc (A)'],
    ['ff', 'FF (%)'],
    ['n', 'n'],
    ['stc_pmp_w', 'Pmax at STC (W)'],
    ['irradiance_w_m2', 'Irradiance (W/m²)'],
    ['whatever', 'whatever'],
  ])('labelWithUnit(%s) = %s', (key, out) => {
    expect(labelWithUnit(key)).toBe(out);
  });

  it('toShown converts stored fractions to the shown %', () => {
    expect(toShown('ff', 0.781)).toBeCloseTo(78.1, 12);
    expect(toShown('voc_v', 49.1)).toBe(49.1);
    expect(toShown('ff', null)).toBeNull();
    expect(unitOf('efficiency')).toBe('%');
  });
});
