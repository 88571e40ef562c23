/**
 * The comparison's "why does Voc differ" sentence: each batch's median Voc, Isc, I0 and n (its
 * devices' single-diode fits) handed to lib/analysis/voc-split.ts. The comparison does not carry
 * the measurement temperatures, so both batches are taken at one temperature and the sentence
 * says so (a temperature difference then shows in the J0 part).
 */
import { splitVocDifference } from '@/lib/analysis/voc-split';
import type { CompareRow } from '@/lib/quality/compare-table';

function median(xs: number[]): number | null {
  if (!xs.length) return null;
  const s = [...xs].sort((a, b) => a - b);
  const m = Math.floor(s.length / 2);
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
}

const col = (rows: CompareRow[], key: string) => rows.map((r) => r[key]).filter((v): v is number => typeof v === 'number' && Number.isFinite(v) && v > 0);

/** The sentence for batch b against batch a, or why there is none. */
export function vocSplitSentence(rows: readonly CompareRow[], a: { id: string; name: string }, b: { id: string; name: string }): { sentence: string } | { error: string } {
  const of = (id: string) => {
    const mine = rows.filter((r) => r.batch_id === id);
    const cells = median(mine.map((r) => r.cells).filter((c): c is number => typeof c === 'number'));
    return { voc_v: median(col(mine, 'voc_v')), isc_a: median(col(mine, 'isc_a')), i0_a: median(col(mine, 'i0_a')), n: median(col(mine, 'n')), cells };
  };
  const x = of(a.id);
  const y = of(b.id);
  for (const [lot, name] of [[x, a.name], [y, b.name]] as const) {
    if (lot.voc_v === null || lot.isc_a === null) return { error: `${name} has no Voc and Isc to compare` };
    if (lot.i0_a === null || lot.n === null) return { error: `${name} has no converged single-diode fits, so its J0 is unknown` };
    if (lot.cells === null) return { error: `${name} does not say how many cells its devices have in series` };
  }
  if (x.cells !== y.cells) return { error: `the batches have ${x.cells} and ${y.cells} cells in series` };
  const lotOf = (l: typeof x) => ({ voc_v: l.voc_v as number, isc_a: l.isc_a as number, i0_a: l.i0_a as number, n: l.n as number, temp_c: 25, cells: l.cells as number });
  const s = splitVocDifference(lotOf(x), lotOf(y), { a: a.name, b: b.name });
  return { sentence: `${s.sentence} Both batches are taken at one cell temperature (the comparison does not carry it), so a temperature difference shows in the J0 part.` };
}
