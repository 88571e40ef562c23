/** The release report's pure parts (lib/quality/report-model.ts); expected values computed by hand in this test. */
import { flagCounts, histogram, limitLines, powerClassLines, reasonInWords } from '@/lib/quality/report-model';
import { powerClassOf } from '@/lib/quality/evaluate';

describe('histogram', () => {
  it('spans the values and the limits; FF in % (fraction × 100); devices without a value counted apart', () => {
    // Values 0.70, 0.75, 0.80 and a limit min 0.72 → shown 70, 75, 80; 3 values → ⌈log2 3⌉ + 1 = 3 bins over 70…80.
    const h = histogram('ff', [0.7, 0.75, 0.8, null], { min: 0.72 });
    expect(h.edges.map((e) => +e.toFixed(6))).toEqual([70, 73.333333, 76.666667, 80]);
    expect(h.counts).toEqual([1, 1, 1]);
    expect(h.min).toBeCloseTo(72, 9);
    expect(h.max).toBeNull();
    expect(h.missing).toBe(1);
    expect(h.title).toBe('FF (%)');
  });

  it('a limit outside the values widens the range so its line is drawn', () => {
    const h = histogram('pmp_w', [400, 402, 404], { min: 390 }, 2);
    expect([h.edges[0], h.edges[2]]).toEqual([390, 404]);
    expect(h.counts).toEqual([0, 3]);
  });

  it('no values and no limits: nothing to draw', () => {
    expect(histogram('pmp_w', [null], undefined).counts).toEqual([]);
  });
});

describe('words for limits and reasons', () => {
  it('limits with labels and shown units (digits from lib/vocabulary.ts)', () => {
    expect(limitLines({ limits: { ff: { min: 0.7 }, pmp_w: { min: 395, max: 410 } } })).toEqual(['FF at least 70.0 %', 'Pmax between 395 W and 410 W']);
  });

  it('the engine’s reasons become a reader’s sentences; others keep their text', () => {
    expect(reasonInWords('ff 0.45978 is below the minimum 0.6')).toBe('FF 46.0 % is below the minimum 60.0 %');
    expect(reasonInWords('flag "kink" is raised and fails this spec')).toBe('Flag "kink" is raised and fails this spec');
  });

  it('flags counted once per curve, most frequent first', () => {
    const f = flagCounts([[{ code: 'a', message: 'A' }, { code: 'a', message: 'A' }], [{ code: 'b', message: 'B' }, { code: 'a', message: 'A' }]]);
    expect(f).toEqual([{ code: 'a', message: 'A', count: 2 }, { code: 'b', message: 'B', count: 1 }]);
  });
});

describe('powerClassLines: what each class means, beside the counts', () => {
  it('none without power classes', () => {
    expect(powerClassLines(undefined)).toEqual([]);
  });

  it('steps: the rule with the tolerance, the lowest and highest class — agreeing with how devices are classed', () => {
    const pc = { step_w: 5, tolerance: { minus_w: 0, plus_w: 5 }, lowest_w: 395, highest_w: 410 };
    expect(powerClassLines(pc)).toEqual([
      'Classes every 5 W named P and the class power: a device is in class PN when N ≤ Pmax < N + 5 W.',
      'The lowest class is P395; a device below it has no class and fails.',
      'The highest class is P410; a device above it gets that class.',
    ]);
    // The words and the classing agree: 399.9 W is P395 (395 ≤ 399.9 < 400), 400 W is P400, 430 W the highest.
    expect([399.9, 400, 430].map((p) => powerClassOf(p, pc).label)).toEqual(['P395', 'P400', 'P410']);
    expect(powerClassOf(394, pc).label).toBeNull();
  });

  it('bins in watts, each with its edges', () => {
    const lines = powerClassLines({ basis: 'stc_pmp_w', bins: [{ label: 'A', nominal_w: 400, min_w: 397.5, max_w: 402.5 }] });
    expect(lines[1]).toBe('Class A (nominal 400 W): Pmax at STC at least 397.5 W and below 402.5 W');
  });

  it('bins around the nameplate, in watts for the batch\'s nameplate (330 W: −2 % → 323.4 W, +5 W → 335 W)', () => {
    const pc = { nameplate_bins: [{ label: 'B', from_pct: -2, to_w: 5 }] };
    const lines = powerClassLines(pc, 330);
    expect(lines[0]).toMatch(/around the batch's nameplate power \(330 W\)/);
    expect(lines[1]).toBe('Class B: Pmax at least nameplate − 2 % and below nameplate + 5 W (323.4 W to below 335 W)');
    expect(powerClassLines(pc, null)[1]).toBe('Class B: Pmax at least nameplate − 2 % and below nameplate + 5 W');
  });
});
