/** The comparison's Voc sentence from rows (invented figures): medians per batch, and the reasons when it cannot be made. */
import { vocSplitSentence } from '@/lib/quality/voc-split-rows';
import type { CompareRow } from '@/lib/quality/compare-table';

const row = (batch_id: string, voc_v: number, i0_a: number | null, cells: number | null = 60): CompareRow => ({
  curve_id: `${batch_id}-${voc_v}`,
  batch_id,
  batch_name: batch_id,
  device_id: `${voc_v}`,
  cells,
  flags: [],
  result: null,
  reasons: [],
  power_class: null,
  outlier: null,
  voc_v,
  isc_a: 9,
  i0_a,
  n: 1.1,
});

it('splits the medians and says what it assumed', () => {
  const rows = [row('a', 41.5, 2e-10), row('a', 41.6, 2e-10), row('a', 41.7, 2e-10), row('b', 40.3, 4e-10), row('b', 40.4, 4e-10), row('b', 40.5, 4e-10)];
  const r = vocSplitSentence(rows, { id: 'a', name: 'Lot A' }, { id: 'b', name: 'Lot B' });
  expect('sentence' in r && r.sentence).toMatch(/^Voc of Lot B differs from Lot A by −1200 mV: −11\d\d mV because its saturation current J0 is higher \(×2\.00/);
  expect('sentence' in r && r.sentence).toMatch(/taken at one cell temperature/);
});

it('names what is missing', () => {
  expect(vocSplitSentence([row('a', 41, null), row('b', 40, 1e-10)], { id: 'a', name: 'Lot A' }, { id: 'b', name: 'Lot B' })).toEqual({ error: 'Lot A has no converged single-diode fits, so its J0 is unknown' });
  expect(vocSplitSentence([row('a', 41, 1e-10), row('b', 40, 1e-10, 72)], { id: 'a', name: 'Lot A' }, { id: 'b', name: 'Lot B' })).toEqual({ error: 'the batches have 60 and 72 cells in series' });
});
