/**
 * Measurement uncertainty (GUM, JCGM 100:2008), decision rules (ILAC-G8) and limits relative to
 * the nameplate. Budgets, devices and limits are invented for these tests; the expected numbers
 * are worked by hand in the comments (GUM 4.3.3, 4.3.7, 5.1.2, 6.2) and checked once more by a
 * Monte Carlo propagation (JCGM 101:2008's method, an independent route to the same number).
 */
import Papa from 'papaparse';
import { comparisonCsv } from '@/lib/quality/compare-csv';
import type { CompareRow } from '@/lib/quality/compare-table';
import { passFailCsv } from '@/lib/quality/csv';
import { insideGuardBand, limitReasons, limitsFor, nameplateLimitWords, resolvePowerClasses } from '@/lib/quality/decision-rules';
import { evaluateBatch, evaluateDevice, type DeviceRecord } from '@/lib/quality/evaluate';
import { parseSpec } from '@/lib/quality/spec';
import { combineBudget, componentSchema, deviceUncertainty, setupInputSchema, standardUncertainty, uncertaintyByKey, valuePlusMinus, type UncertaintyComponent } from '@/lib/quality/uncertainty';
import { checkExport } from '@/tests/support/export-checks';

const coeff = { alpha_pct_per_k: 0.05, beta_pct_per_k: -0.28, gamma_pct_per_k: -0.35 };

/** An invented budget: reference cell (normal, k = 2), non-uniformity (rectangular), temperature (rectangular, K), tester (normal on Pmax), Voc reading (rectangular on Voc). */
const budget: UncertaintyComponent[] = [
  { name: 'Reference cell calibration', acts_on: 'irradiance', value: 1.6, unit: '%', distribution: 'normal', k: 2 },
  { name: 'Spatial non-uniformity', acts_on: 'irradiance', value: 1, unit: '%', distribution: 'rectangular' },
  { name: 'Cell temperature', acts_on: 'temperature', value: 1, unit: 'K', distribution: 'rectangular' },
  { name: 'Tester, Pmax', acts_on: 'pmp', value: 0.5, unit: '%', distribution: 'normal', k: 2 },
  { name: 'Voltage reading', acts_on: 'voc', value: 0.3, unit: '%', distribution: 'rectangular' },
];

describe('GUM combination', () => {
  it('standard uncertainties: U/k for a normal component, a/√3 for a rectangular one', () => {
    expect(standardUncertainty({ value: 1.6, distribution: 'normal', k: 2 })).toBeCloseTo(0.8, 12);
    expect(standardUncertainty({ value: 1, distribution: 'rectangular' })).toBeCloseTo(0.5773502692, 9);
  });

  it('matches the worked example (sensitivities: irradiance 1 %/% on Pmax and Isc, 0.05 %/% on Voc; |α|, |β|, |γ| for temperature)', () => {
    // Worked by hand. Standard uncertainties: 1.6/2 = 0.8 %, 1/√3 = 0.57735 %, 1/√3 = 0.57735 K, 0.5/2 = 0.25 %, 0.3/√3 = 0.173205 %.
    // Pmax: 0.8² + 0.57735² + (0.35·0.57735)² + 0.25² = 0.64 + 0.333333 + 0.040833 + 0.0625 = 1.076667 → u_c = 1.037626 → U = 2.075252 %.
    // Isc:  0.64 + 0.333333 + (0.05·0.57735)² = 0.973333 + 0.000833 = 0.974167 → u_c = 0.987000 → U = 1.974000 %.
    // Voc:  (0.05·0.8)² + (0.05·0.57735)² + (0.28·0.57735)² + 0.173205² = 0.0016 + 0.000833 + 0.026133 + 0.03 = 0.058567 → U = 0.484011 %.
    const pm = Math.sqrt(0.8 ** 2 + 1 / 3 + (0.35 ** 2) / 3 + 0.25 ** 2) * 2;
    const is = Math.sqrt(0.8 ** 2 + 1 / 3 + (0.05 ** 2) / 3) * 2;
    const vo = Math.sqrt((0.05 * 0.8) ** 2 + (0.05 ** 2) / 3 + (0.28 ** 2) / 3 + 0.09 / 3) * 2;
    const b = combineBudget(budget, coeff);
    expect(b.u_pmp_pct_k2).toBeCloseTo(pm, 10);
    expect(b.u_pmp_pct_k2).toBeCloseTo(2.075252, 5);
    expect(b.u_isc_pct_k2).toBeCloseTo(is, 10);
    expect(b.u_isc_pct_k2).toBeCloseTo(1.974, 5);
    expect(b.u_voc_pct_k2).toBeCloseTo(vo, 10);
    expect(b.u_voc_pct_k2).toBeCloseTo(0.484011, 5);
  });

  it('agrees with a Monte Carlo propagation of the same distributions (JCGM 101 route, seeded)', () => {
    // Relative change of Pmax = δG (two irradiance components) + γ·δT + δ(tester); the expanded
    // uncertainty is 2 × the standard deviation of the simulated changes.
    // mulberry32, a small seeded generator (public domain), so the test gives the same numbers each run.
    let seed = 12345;
    const uniform = () => {
      seed = (seed + 0x6d2b79f5) | 0;
      let t = Math.imul(seed ^ (seed >>> 15), 1 | seed);
      t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t;
      return (((t ^ (t >>> 14)) >>> 0) + 0.5) / 4294967296;
    };
    const normal = () => Math.sqrt(-2 * Math.log(uniform())) * Math.cos(2 * Math.PI * uniform());
    const n = 200_000;
    let s = 0;
    let s2 = 0;
    for (let i = 0; i < n; i++) {
      const dG = 0.8 * normal() + (2 * uniform() - 1) * 1;
      const dT = (2 * uniform() - 1) * 1;
      const x = dG + -0.35 * dT + 0.25 * normal();
      s += x;
      s2 += x * x;
    }
    const sd = Math.sqrt(s2 / n - (s / n) ** 2);
    expect(Math.abs(2 * sd - combineBudget(budget, coeff).u_pmp_pct_k2) / (2 * sd)).toBeLessThan(0.01);
  });

  it('falls back to typical coefficients where the batch has none, and is zero without components', () => {
    const temp = [budget[2]];
    // |γ| = 0.40 %/K typical (common practice): 2 × 0.4/√3 = 0.461880 %.
    expect(combineBudget(temp).u_pmp_pct_k2).toBeCloseTo((2 * 0.4) / Math.sqrt(3), 10);
    expect(combineBudget([])).toEqual({ u_pmp_pct_k2: 0, u_isc_pct_k2: 0, u_voc_pct_k2: 0 });
  });

  it('each device figure carries the relative uncertainty of its setup (STC Pmax takes Pmax\'s)', () => {
    const b = { u_pmp_pct_k2: 3, u_isc_pct_k2: 2, u_voc_pct_k2: 1 };
    const u = deviceUncertainty({ pmp_w: 300, isc_a: 10, voc_v: 40, stc_pmp_w: 310, ff: 0.8 }, b);
    expect(u).toEqual({ pmp_w: 9, isc_a: 0.2, voc_v: 0.4, stc_pmp_w: 9.3 });
    expect(uncertaintyByKey(u)).toEqual({ u_pmp_w: 9, u_isc_a: 0.2, u_voc_v: 0.4, u_stc_pmp_w: 9.3 });
    expect(deviceUncertainty({ pmp_w: 300 }, null)).toEqual({});
  });

  it('refuses a component in the wrong unit, a normal one without k and a rectangular one with k', () => {
    expect(componentSchema.safeParse({ name: 'T', acts_on: 'temperature', value: 1, unit: '%', distribution: 'rectangular' }).success).toBe(false);
    expect(componentSchema.safeParse({ name: 'G', acts_on: 'irradiance', value: 1, unit: '%', distribution: 'normal' }).success).toBe(false);
    expect(componentSchema.safeParse({ name: 'G', acts_on: 'irradiance', value: 1, unit: '%', distribution: 'rectangular', k: 2 }).success).toBe(false);
    expect(setupInputSchema.safeParse({ name: 'Line 1 tester', components: budget }).success).toBe(true);
  });

  it('writes a value with its uncertainty to two significant digits of U (GUM 7.2.6)', () => {
    expect(valuePlusMinus(287.04, 8.812)).toBe('287.0 ± 8.8');
    expect(valuePlusMinus(9.87654, 0.1976)).toBe('9.88 ± 0.20');
  });
});

describe('decision rules', () => {
  const lim = { min: 284.2 };
  // Invented: U = 8.8 W. The guard band asks for Pmax ≥ 284.2 + 8.8 = 293.0 W.
  it.each([
    ['simple', 287.0, 'pass'],
    ['simple', 284.2, 'pass'], // on the limit: bounds are inclusive
    ['simple', 284.1, 'below_min'],
    ['guard_band', 293.01, 'pass'], // just outside the guard band
    ['guard_band', 293.0, 'pass'], // exactly U above: clears it
    ['guard_band', 292.99, 'inside_guard_band'], // just inside
    ['guard_band', 287.0, 'inside_guard_band'],
    ['guard_band', 284.1, 'below_min'],
  ] as const)('%s rule, Pmax %p W with U = 8.8 W → %s', (rule, v, expected) => {
    const r = limitReasons('pmp_w', v, 8.8, lim, rule);
    expect(r.length ? r[0].kind : 'pass').toBe(expected);
  });

  it('says which rule failed the device, with the value and its uncertainty', () => {
    expect(limitReasons('pmp_w', 287.04, 8.812, lim, 'guard_band')[0].message).toBe('Pmax 287.0 ± 8.8 W does not clear the minimum 284.2 W by its uncertainty (guard-band rule)');
    expect(limitReasons('pmp_w', 280, 8.8, lim, 'simple')[0].message).toBe('Pmax 280.0 ± 8.8 W is below the minimum 284.2 W (simple rule)');
    expect(limitReasons('voc_v', 49.9, 0.2, { max: 50 }, 'guard_band')[0].message).toMatch(/^Voc 49\.90 ± 0\.20 V does not stay below the maximum 50 V by its uncertainty/);
  });

  it('a parameter without an uncertainty is judged as by the simple rule', () => {
    expect(limitReasons('ff', 0.7001, undefined, { min: 0.7 }, 'guard_band')).toEqual([]);
  });

  it('counts a device inside the guard band under either rule (|value − limit| < U)', () => {
    expect(insideGuardBand(287, 8.8, lim)).toBe(true);
    expect(insideGuardBand(280, 8.8, lim)).toBe(true);
    expect(insideGuardBand(293.0, 8.8, lim)).toBe(false);
    expect(insideGuardBand(287, null, lim)).toBe(false);
    const spec = (rule: 'simple' | 'guard_band') => parseSpec({ name: 'x', limits: { pmp_w: { min: 284.2 } }, decision_rule: rule });
    const devices: DeviceRecord[] = [
      { device_id: 'A', values: { pmp_w: 287 }, flags: [], uncertainty: { pmp_w: 8.8 } },
      { device_id: 'B', values: { pmp_w: 300 }, flags: [], uncertainty: { pmp_w: 9.2 } },
    ];
    const simple = evaluateBatch(devices, spec('simple'));
    const guard = evaluateBatch(devices, spec('guard_band'));
    expect(simple.counts.pass).toBe(2);
    expect(guard.counts.pass).toBe(1);
    expect([simple.inside_guard_band, guard.inside_guard_band]).toEqual([1, 1]);
    expect(guard.decision_rule).toBe('guard_band');
  });
});

describe('limits relative to the nameplate', () => {
  it('turns W and % offsets into watts and keeps the stricter of an absolute and a relative bound', () => {
    const spec = parseSpec({ name: 'x', limits: { pmp_w: { min: 290, max: 320 } }, nameplate_limits: { pmp_w: { below_w: 0, above_w: 5 }, stc_pmp_w: { below_pct: 3, above_pct: 3 } } });
    const r = limitsFor(spec, 300);
    // min: max(290, 300 − 0) = 300; max: min(320, 300 + 5) = 305. STC: 300 × 0.97 = 291, 300 × 1.03 = 309.
    expect(r.limits.pmp_w).toEqual({ min: 300, max: 305 });
    expect(r.limits.stc_pmp_w!.min).toBeCloseTo(291, 9);
    expect(r.limits.stc_pmp_w!.max).toBeCloseTo(309, 9);
    expect(nameplateLimitWords('pmp_w', spec.nameplate_limits!.pmp_w!)).toBe('Pmax at least nameplate − 0 W and at most nameplate + 5 W');
  });

  it('judges each device against its own nameplate, else fails it for want of one', () => {
    const spec = parseSpec({ name: 'x', nameplate_limits: { pmp_w: { below_w: 0 } } });
    expect(evaluateDevice({ device_id: 'a', values: { pmp_w: 401 }, flags: [], nameplate_w: 400 }, spec).result).toBe('pass');
    const low = evaluateDevice({ device_id: 'b', values: { pmp_w: 399.5 }, flags: [], nameplate_w: 400 }, spec);
    expect(low.reasons[0].message).toBe('Pmax 399.5 W is below the minimum 400 W (nameplate − 0 W of 400 W) (simple rule)');
    expect(evaluateDevice({ device_id: 'c', values: { pmp_w: 399.5 }, flags: [], nameplate_w: 395 }, spec).result).toBe('pass');
    expect(evaluateDevice({ device_id: 'd', values: { pmp_w: 401 }, flags: [] }, spec).reasons[0].kind).toBe('no_nameplate');
  });

  it('classes power in bins around the nameplate', () => {
    const spec = parseSpec({ name: 'x', power_classes: { nameplate_bins: [{ label: '−3..0 W', from_w: -3, to_w: 0 }, { label: '0..+5 W', from_w: 0, to_w: 5 }, { label: '+5..+2 %', from_pct: 1.25, to_pct: 2 }] } });
    const cls = (p: number) => evaluateDevice({ device_id: 'x', values: { pmp_w: p }, flags: [], nameplate_w: 400 }, spec).power_class;
    expect([cls(397), cls(399.99), cls(400), cls(404.99), cls(405), cls(407.99), cls(408)]).toEqual(['−3..0 W', '−3..0 W', '0..+5 W', '0..+5 W', '+5..+2 %', '+5..+2 %', null]);
    expect(resolvePowerClasses(spec.power_classes!, null)).toBeNull();
    expect(() => parseSpec({ name: 'x', power_classes: { nameplate_bins: [{ label: 'a', from_w: 0, to_pct: 1 }] } })).toThrow(/both ends in W or both in %/);
  });
});

describe('the exports carry the uncertainties and the rule', () => {
  const devices: DeviceRecord[] = [
    { device_id: 'M1', values: { pmp_w: 287.04, isc_a: 9.5, voc_v: 40.2 }, flags: [], uncertainty: { pmp_w: 8.812, isc_a: 0.19, voc_v: 0.2 } },
    { device_id: 'M2', values: { pmp_w: 300 }, flags: [], uncertainty: { pmp_w: 9.2 } },
  ];
  const meta = { batchName: 'b', spec: { name: 'GB', version: 1 }, releaseState: 'open', exportedAt: new Date(Date.UTC(2026, 11, 2)), params: ['isc_a', 'voc_v', 'pmp_w'] as const };

  it('pass/fail CSV: u_ columns after their figure, in_guard_band and decision_rule, read back with papaparse', () => {
    const e = evaluateBatch(devices, parseSpec({ name: 'GB', limits: { pmp_w: { min: 284.2 } }, decision_rule: 'guard_band' }));
    const text = passFailCsv(e, { ...meta, params: [...meta.params] });
    const read = checkExport(text, 2);
    expect(read.header.slice(8, 14)).toEqual(['isc_a', 'u_isc_a', 'voc_v', 'u_voc_v', 'pmp_w', 'u_pmp_w']);
    const papa = Papa.parse<Record<string, string>>(text, { header: true, dynamicTyping: true }).data as unknown as Record<string, string | number>[];
    expect(papa.map((r) => [r.device_id, r.result, r.u_pmp_w, r.in_guard_band, r.decision_rule])).toEqual([
      ['M1', 'fail', 8.812, 'yes', 'guard_band'],
      ['M2', 'pass', 9.2, 'no', 'guard_band'],
    ]);
    expect(papa[0].reasons).toBe('Pmax 287.0 ± 8.8 W does not clear the minimum 284.2 W by its uncertainty (guard-band rule)');
  });

  it('comparison CSV: u_ columns after their figure and the rule of the spec', () => {
    const rows: CompareRow[] = [{ curve_id: 'c1', batch_id: 'a', batch_name: 'A', device_id: 'M1', cells: 60, flags: [], result: 'pass', reasons: [], power_class: null, outlier: false, pmp_w: 287.04, u_pmp_w: 8.812 }];
    const text = comparisonCsv({ rows, columns: ['pmp_w'], batches: [{ id: 'a', name: 'A', state: 'open' }], spec: { name: 'GB', version: 1, decision_rule: 'guard_band' }, exportedAt: new Date() });
    const read = checkExport(text, 1);
    expect(read.header.slice(0, 5)).toEqual(['device_id', 'batch_name', 'pmp_w', 'u_pmp_w', 'decision_rule']);
    expect([read.records[0].u_pmp_w, read.records[0].decision_rule]).toEqual(['8.812', 'guard_band']);
  });
});
