import { evaluateBatch, evaluateDevice, powerClassOf, type DeviceRecord } from '@/lib/quality/evaluate';
import { QualityError } from '@/lib/quality/errors';
import { parseSpec } from '@/lib/quality/spec';

const spec = parseSpec({
  name: 'mono 400',
  limits: { pmp_w: { min: 395 }, rs_ohm: { max: 0.5 }, ff: { min: 0.74, max: 0.85 } },
  power_classes: { step_w: 5 },
  fail_flags: ['step_in_curve', 'shunt_suspected'],
});

const device = (device_id: string, values: DeviceRecord['values'], flags: string[] = []): DeviceRecord => ({ device_id, values, flags });

describe('evaluateDevice(): a figure no method can give (Pmax at STC of a curve with a step)', () => {
  // The reason as lib/analysis/stc.ts words it, shortened; the device values are invented.
  const why = 'the curve has a step (a bypass diode conducting, mismatched or cracked cells)';
  const stcSpec = parseSpec({ name: 'stc 300', limits: { stc_pmp_w: { min: 300 } }, power_classes: { step_w: 5, basis: 'stc_pmp_w' } });
  const stepped: DeviceRecord = { device_id: 'M2611-015', values: { pmp_w: 260.1, stc_pmp_w: null }, flags: ['step'], absent: { stc_pmp_w: why } };

  it('a limit on it fails as "not measurable" with the reason, and no power class is given, also with the reason', () => {
    const r = evaluateDevice(stepped, stcSpec);
    expect(r.result).toBe('fail');
    expect(r.power_class).toBeNull();
    expect(r.reasons.map((x) => [x.kind, x.param, x.value])).toEqual([
      ['not_measurable', 'stc_pmp_w', null],
      ['power_class', 'stc_pmp_w', null],
    ]);
    expect(r.reasons[0].message).toContain('not measurable');
    expect(r.reasons[0].message).toContain(why);
    expect(r.reasons[1].message).toContain('No power class');
    expect(r.reasons[1].message).toContain(why);
  });

  it('without a reason it stays "not measured"', () => {
    const r = evaluateDevice({ device_id: 'X', values: { stc_pmp_w: null }, flags: [] }, stcSpec);
    expect(r.reasons[0].kind).toBe('not_measured');
  });
});

describe('evaluateDevice()', () => {
  it('passes a device inside every limit and classes it', () => {
    const r = evaluateDevice(device('M1', { pmp_w: 402.3, rs_ohm: 0.31, ff: 0.79 }), spec);
    expect(r).toEqual({ device_id: 'M1', result: 'pass', reasons: [], power_class: 'P400', in_guard_band: false });
  });

  it('lists every reason, with value, limit and bound', () => {
    const r = evaluateDevice(device('M2', { pmp_w: 390, rs_ohm: 0.62, ff: 0.9 }, ['step_in_curve', 'minor_noise']), spec);
    expect(r.result).toBe('fail');
    expect(r.reasons.map((x) => [x.kind, x.param, x.value, x.limit, x.bound])).toEqual([
      ['below_min', 'pmp_w', 390, 'min', 395],
      ['above_max', 'ff', 0.9, 'max', 0.85],
      ['above_max', 'rs_ohm', 0.62, 'max', 0.5],
      ['flag', 'flags', 'step_in_curve', null, null],
    ]);
    // Labels, units and digits from the key table (lib/vocabulary.ts): FF as % with 1 decimal; each limit reason names the decision rule.
    expect(r.reasons[0].message).toBe('Pmax 390 W is below the minimum 395 W (simple rule)');
    expect(r.reasons[1].message).toBe('FF 90.0 % is above the maximum 85.0 % (simple rule)');
    expect(r.reasons[2].message).toBe('Rs 0.62 Ω is above the maximum 0.5 Ω (simple rule)');
    expect(r.reasons[3].message).toBe('Flag raised: step_in_curve; this spec fails it');
    expect(r.power_class).toBe('P390');
  });

  it('treats bounds as inclusive', () => {
    expect(evaluateDevice(device('M3', { pmp_w: 395, rs_ohm: 0.5, ff: 0.74 }), spec).result).toBe('pass');
  });

  it('fails a limited parameter that was not measured, and a module without power', () => {
    const r = evaluateDevice(device('M4', { pmp_w: 401, ff: null }), spec);
    expect(r.reasons.map((x) => x.message)).toEqual(['FF was not measured', 'Rs was not measured']);
    const noPower = evaluateDevice(device('M5', { rs_ohm: 0.3, ff: 0.8 }), spec);
    expect(noPower.power_class).toBeNull();
    expect(noPower.reasons.map((x) => x.message)).toEqual(['Pmax was not measured', 'Pmax was not measured, so no power class']);
  });

  it.each([
    [{ pmp_w: Number.NaN }, /device "bad": pmp_w is NaN/],
    [{ pmp_w: Infinity }, /pmp_w is Infinity/],
  ])('rejects non-finite values %p', (values, message) => {
    expect(() => evaluateDevice(device('bad', values), spec)).toThrow(QualityError);
    expect(() => evaluateDevice(device('bad', values), spec)).toThrow(message);
  });

  it('rejects a record without an id', () => {
    expect(() => evaluateDevice({ device_id: '', values: {}, flags: [] }, spec)).toThrow(/device_id must be a non-empty string/);
  });
});

describe('power classes', () => {
  const steps = parseSpec({ name: 's', power_classes: { step_w: 5 } }).power_classes!;
  // Positive-only tolerance (common practice): class P when P ≤ Pmax < P + 5 W.
  it.each([
    [399.99, 'P395'],
    [400, 'P400'],
    [404.999, 'P400'],
    [405, 'P405'],
    [3.2, null],
  ])('step 5 W: %p W → %p', (p, label) => {
    expect(powerClassOf(p, steps).label).toBe(label);
  });

  const symmetric = parseSpec({ name: 's', power_classes: { step_w: 5, tolerance: { minus_w: 2.5, plus_w: 2.5 }, label_prefix: 'M' } }).power_classes!;
  // P − 2.5 ≤ Pmax < P + 2.5
  it.each([
    [397.5, 'M400'],
    [402.49, 'M400'],
    [402.5, 'M405'],
    [397.49, 'M395'],
  ])('±2.5 W around the nameplate: %p W → %p', (p, label) => {
    expect(powerClassOf(p, symmetric).label).toBe(label);
  });

  const range = parseSpec({ name: 's', power_classes: { step_w: 2.5, lowest_w: 395, highest_w: 410 } }).power_classes!;
  it.each([
    [396.2, 'P395', null],
    [392.4, null, /below the lowest power class P395/],
    [431, 'P410', null],
    [402.5, 'P402.5', null],
  ])('offered range 395–410 W: %p W → %p', (p, label, problem) => {
    const r = powerClassOf(p, range);
    expect(r.label).toBe(label);
    if (problem) expect(r.problem).toMatch(problem);
    else expect(r.problem).toBeNull();
  });

  const bins = parseSpec({
    name: 'b',
    power_classes: {
      basis: 'stc_pmp_w',
      bins: [
        { label: 'Gold', nominal_w: 410, min_w: 410, max_w: 420 },
        { label: 'Silver', nominal_w: 400, min_w: 400, max_w: 410 },
      ],
    },
  });
  it.each([
    [405, 'Silver'],
    [410, 'Gold'],
    [399.9, null],
    [420, null],
  ])('explicit bins on stc_pmp_w: %p W → %p', (p, label) => {
    const r = evaluateDevice(device('B', { stc_pmp_w: p, pmp_w: 1 }), bins);
    expect(r.power_class).toBe(label);
    expect(r.result).toBe(label ? 'pass' : 'fail');
    if (!label) expect(r.reasons[0].message).toMatch(/^Pmax at STC .* W falls in no power class \(the classes cover 400–420 W\)$/);
  });
});

describe('evaluateBatch()', () => {
  // 9 modules around 401 W and one at 360 W: pmp_w median 401, MAD 1 (hand: |dev| sorted
  // 0,0,1,1,1,1,1,2,2,41 → (1 + 1)/2 = 1); M(360) = 0.6745·(−41)/1 = −27.7 → outlier.
  const pmp = [400, 401, 402, 401, 400, 402, 401, 399, 403, 360];
  const devices = pmp.map((p, i) => device(`M${i + 1}`, { pmp_w: p, rs_ohm: 0.3 + i * 0.01, ff: 0.8 }, i === 4 ? ['shunt_suspected'] : []));
  devices.push(device('M11', { rs_ohm: 0.35, ff: 0.8 }));
  const r = evaluateBatch(devices, spec, { outlier_params: ['pmp_w', 'rs_ohm'] });

  it('counts pass, fail and outliers', () => {
    // fails: M5 (flag), M10 (360 W < 395), M11 (pmp_w not measured)
    expect(r.counts).toEqual({ total: 11, pass: 8, fail: 3, outliers: 1 });
    expect(r.devices.filter((d) => d.result === 'fail').map((d) => d.device_id)).toEqual(['M5', 'M10', 'M11']);
  });

  it('marks the low module as a pmp_w outlier with the hand-computed score', () => {
    const low = r.devices[9];
    expect(low.outlier).toBe(true);
    expect(low.outlier_params).toEqual(['pmp_w']);
    expect(low.robust_z.pmp_w).toBeCloseTo(0.6745 * -41, 10);
    expect(r.devices[10].robust_z.pmp_w).toBeNull();
  });

  it('describes each parameter with Cpk against the spec limits', () => {
    const s = r.stats.pmp_w!;
    expect(s.n).toBe(10);
    // mean = (400+401+402+401+400+402+401+399+403+360)/10 = 3969/10
    expect(s.mean).toBeCloseTo(396.9, 10);
    // one-sided (min 395): (μ − 395)/(3·sd)
    expect(s.cpk_side).toBe('lower');
    expect(s.cpk).toBeCloseTo((396.9 - 395) / (3 * s.sd!), 12);
    expect(r.stats.ff!.cpk).toBeNull(); // all 0.8: zero spread
    expect(Object.keys(r.stats)).toEqual(['pmp_w', 'ff', 'rs_ohm']);
    // 400–403 W → P400 (8 modules), 399 W → P395, 360 W → P360
    expect(r.power_class_counts).toEqual({ P400: 8, P395: 1, P360: 1 });
  });

  it('keeps the values for the export and returns plain JSON', () => {
    expect(JSON.parse(JSON.stringify(r))).toEqual(r);
    expect(r.devices[0].values.pmp_w).toBe(400);
  });

  it('rejects an unknown outlier parameter', () => {
    expect(() => evaluateBatch(devices, spec, { outlier_params: ['pmax' as never] })).toThrow(/unknown parameter "pmax"/);
  });

  it('handles an empty batch', () => {
    const e = evaluateBatch([], spec);
    expect(e.counts).toEqual({ total: 0, pass: 0, fail: 0, outliers: 0 });
    expect(e.stats.pmp_w).toBeNull();
  });
});
