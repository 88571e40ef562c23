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
import { GRID_PARAMS } from '@/lib/compare-columns';
import { evaluateBatch } from '@/lib/quality/evaluate';
import { passFailRows } from '@/lib/quality/csv';
import { parseSpec } from '@/lib/quality/spec';
import * as characterisationAnswer from '@/lib/schemas/characterisation-answer';
import * as batchPhysicsAnswer from '@/lib/schemas/batch-physics-answer';
import * as responses from '@/lib/schemas/responses';
import { formatNumber, formatNumberAgainst, labelOf } from '@/lib/vocabulary';

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

/** zod 4's definition of a schema, for walking the response schemas. */
type Def = { type: string; shape?: Record<string, unknown>; element?: unknown; innerType?: unknown; options?: unknown[]; in?: unknown; out?: unknown; valueType?: unknown };
const defOf = (schema: unknown): Def => (schema as { _zod: { def: Def } })._zod.def;

/** True when the schema (through optional, nullable, default and pipes) is a number. */
function isNumberSchema(schema: unknown): boolean {
  const d = defOf(schema);
  if (d.type === 'number') return true;
  if (d.type === 'optional' || d.type === 'nullable' || d.type === 'default' || d.type === 'readonly') return isNumberSchema(d.innerType);
  if (d.type === 'pipe') return isNumberSchema(d.in);
  return false;
}

/** Every object key of a response schema whose value is a number, with where it is. */
function numericSchemaKeys(schema: unknown, at: string, out: { key: string; at: string }[] = [], seen = new Set<unknown>()): typeof out {
  if (seen.has(schema)) return out;
  seen.add(schema);
  const d = defOf(schema);
  if (d.type === 'object') {
    for (const [key, v] of Object.entries(d.shape ?? {})) {
      if (isNumberSchema(v)) out.push({ key, at: `${at}.${key}` });
      else numericSchemaKeys(v, `${at}.${key}`, out, seen);
    }
  } else if (d.type === 'array') numericSchemaKeys(d.element, `${at}[]`, out, seen);
  else if (d.type === 'optional' || d.type === 'nullable' || d.type === 'default' || d.type === 'readonly') numericSchemaKeys(d.innerType, at, out, seen);
  else if (d.type === 'union') (d.options ?? []).forEach((o) => numericSchemaKeys(o, at, out, seen));
  else if (d.type === 'pipe') numericSchemaKeys(d.in, at, out, seen);
  // A record's keys are data (batch ids, parameter keys), not field names: its values are walked.
  else if (d.type === 'record') numericSchemaKeys(d.valueType, `${at}{}`, out, seen);
  return out;
}

describe('every key that leaves the process in reasons, CSV headers and answers is in the table', () => {
  // Invented devices and spec (this test's own scenario).
  const spec = parseSpec({
    name: 'release',
    limits: { ff: { min: 0.7 }, voc_v: { max: 42 }, stc_pmp_w: { min: 395 }, rs_ohm: { max: 0.5 }, j0_a_cm2: { max: 1e-12 }, efficiency: { min: 0.2 } },
    power_classes: { step_w: 5, basis: 'stc_pmp_w' },
    fail_flags: ['step'],
  });
  const evaluation = evaluateBatch(
    [
      { device_id: 'A', values: { ff: 0.59, voc_v: 42.0011, stc_pmp_w: 390, rs_ohm: null, j0_a_cm2: 2e-12, efficiency: 0.19, pmp_w: 380 }, flags: ['step'] },
      { device_id: 'B', values: { ff: 0.78, voc_v: 41.2, stc_pmp_w: 401, rs_ohm: 0.3, j0_a_cm2: 5e-13, efficiency: 0.21, pmp_w: 399 }, flags: [] },
    ],
    spec,
  );

  it('every parameter a reason names has a label and a unit entry, and the reason shows the label', () => {
    const reasons = evaluation.devices.flatMap((d) => d.reasons);
    expect(reasons.length).toBeGreaterThan(5);
    for (const r of reasons) {
      if (r.param === 'flags') continue;
      expect({ key: r.param, known: isKnownKey(r.param) }).toEqual({ key: r.param, known: true });
      expect(r.message.startsWith(labelOf(r.param))).toBe(true);
    }
  });

  it('every numeric column of the pass/fail CSV and of the comparison export is a key of the table', () => {
    const rows = passFailRows(evaluation, { batchName: 'Lot V', spec: { name: 'release', version: 1 }, releaseState: 'open', exportedAt: new Date('2026-12-02T00:00:00Z') });
    rows.fields.forEach((field, k) => {
      if (rows.data.some((row) => typeof row[k] === 'number')) expect({ field, known: isKnownKey(field) }).toEqual({ field, known: true });
    });
    for (const k of GRID_PARAMS) expect({ k, known: isKnownKey(k) }).toEqual({ k, known: true });
  });

  it('every numeric field of the API answer schemas (lib/schemas/responses.ts) is a key of the table', () => {
    const found = Object.entries({ ...responses, ...characterisationAnswer, ...batchPhysicsAnswer })
      .filter(([, v]) => v && typeof v === 'object' && '_zod' in (v as object))
      .flatMap(([name, schema]) => numericSchemaKeys(schema, name));
    expect(found.length).toBeGreaterThan(20);
    expect(found.filter(({ key }) => !isKnownKey(key)).map((f) => f.at)).toEqual([]);
  });

  it('the walk of the schemas fails for a numeric field the table does not know (the test can fail)', () => {
    const made = responses.batchSchema.extend({ new_figure_x: responses.batchSchema.shape.cells });
    expect(numericSchemaKeys(made, 'made').filter(({ key }) => !isKnownKey(key)).map((f) => f.at)).toEqual(['made.new_figure_x']);
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
      // The Welch figures of the two batches end in _a and _b (batch A, batch B), not in a unit:
      // a statistic takes the unit of the parameter it describes.
      if (x.group === 'statistic') continue;
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

  it('formatNumber is formatValue without the unit (for a cell under a header that has it)', () => {
    expect(formatNumber('ff', 0.71349)).toBe('71.3');
    expect(formatNumber('voc_v', 49.374)).toBe('49.37');
    expect(formatNumber('i0_a', 3.1068e-7)).toBe('3.107×10⁻⁷');
    expect(formatNumber('voc_v', null)).toBe('—');
  });

  it('a value beside a limit gets the digits it needs to differ from it (a table cell of a failing device)', () => {
    // 42.0011 V at 4 significant digits reads "42", the same as its limit 42 V; 5 digits tell them apart.
    expect(formatNumber('voc_v', 42.0011)).toBe('42');
    expect(formatNumberAgainst('voc_v', 42.0011, [42])).toBe('42.001');
    expect(formatNumberAgainst('voc_v', 45.123, [42])).toBe('45.12');
    expect(formatNumberAgainst('ff', 0.69996, [0.7])).toBe('69.996');
  });

  it('toShown converts stored fractions to the shown %', () => {
    expect(toShown('ff', 0.781)).toBeCloseTo(78.1, 12);
    expect(toShown('voc_v', 49.1)).toBe(49.1);
    expect(toShown('ff', null)).toBeNull();
    expect(unitOf('efficiency')).toBe('%');
  });
});
