/** The release report's pure parts (lib/quality/report-model.ts); expected values computed by hand in this test. */
import { flagCounts, histogram, limitLines, reasonInWords } from '@/lib/quality/report-model';

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
