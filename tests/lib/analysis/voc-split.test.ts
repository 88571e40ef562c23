/**
 * The lot-to-lot Voc split against the invented diode of tests/lib/analysis/characterise/synthetic.ts
 * (its own solver): lot b is the module with a doubled I0, or 2 % less light, or 10 K warmer; each
 * difference must land in its own part, worked against ΔVoc = n·Ns·kT/q·ln(ratio) by hand.
 */
import { splitVocDifference } from '@/lib/analysis/voc-split';
import type { LotDiode } from '@/lib/analysis/voc-split';
import { MODULE, truthCurrent, truthVoc } from '@/tests/lib/analysis/characterise/synthetic';

const kT_q = (t: number) => (1.380649e-23 * (t + 273.15)) / 1.602176634e-19;

function lot(g: number, t: number, i0Factor = 1): LotDiode {
  const m = { ...MODULE, i0_stc_a: MODULE.i0_stc_a * i0Factor };
  // Voc of this module by bisection with the test model's own current.
  let lo = 0;
  let hi = 60;
  for (let k = 0; k < 200; k++) {
    const mid = (lo + hi) / 2;
    if (truthCurrent(mid, g, t, m) > 0) lo = mid;
    else hi = mid;
  }
  const i0 = m.i0_stc_a * ((t + 273.15) / 298.15) ** 3 * Math.exp(((1.12 * 1.602176634e-19) / 1.380649e-23) * (1 / 298.15 - 1 / (t + 273.15)));
  return { voc_v: (lo + hi) / 2, isc_a: truthCurrent(0, g, t, m), i0_a: i0, n: MODULE.n, temp_c: t, cells: MODULE.cells };
}

describe('why is this lot’s Voc lower', () => {
  it('a doubled J0 shows as the J0 part: −n·Ns·kT/q·ln 2', () => {
    const s = splitVocDifference(lot(1000, 25), lot(1000, 25, 2));
    // By hand: 1.1 · 60 · 0.025693 V · ln 2 = 1.1754 V.
    expect(s.j0_v).toBeCloseTo(-MODULE.n * MODULE.cells * kT_q(25) * Math.LN2, 3);
    expect(Math.abs(s.isc_v)).toBeLessThan(1e-3);
    expect(Math.abs(s.temperature_v)).toBeLessThan(1e-9);
    expect(Math.abs(s.other_v)).toBeLessThan(0.01);
    expect(s.sentence).toMatch(/^Voc of this lot differs from the first lot by −1\d{3} mV: −11\d\d mV because its saturation current J0 is higher \(×2\.00/);
  });

  it('less light shows as the Isc part, a warmer measurement as the temperature part', () => {
    const dim = splitVocDifference(lot(1000, 25), lot(980, 25));
    expect(dim.isc_v).toBeCloseTo(MODULE.n * MODULE.cells * kT_q(25) * Math.log(0.98), 3);
    expect(Math.abs(dim.j0_v)).toBeLessThan(1e-9);
    const warm = splitVocDifference(lot(1000, 25), lot(1000, 35));
    // The model's own Voc change over 10 K; the ni-power law of I0 is not the T³·exp(−Eg/kT) law of the test model, so a few mV may move to `other_v`.
    // The two laws differ by about 1 mV per cell over 10 K here, which the split books as J0 (said in its assumptions).
    expect(warm.temperature_v).toBeCloseTo(truthVoc(1000, 35) - truthVoc(1000, 25), 1);
    expect(Math.abs(warm.j0_v)).toBeLessThan(0.1);
    expect(warm.temperature_v + warm.j0_v + warm.isc_v + warm.other_v).toBeCloseTo(warm.delta_voc_v, 9);
    expect(warm.sentence).toMatch(/10\.0 K warmer/);
  });

  it('refuses lots of different cell counts', () => {
    expect(() => splitVocDifference(lot(1000, 25), { ...lot(1000, 25), cells: 72 })).toThrow(/60 and 72 cells/);
  });
});
