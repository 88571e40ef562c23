/** The spec editor's power classes: spec → form → spec, the rows' messages, and the merge after a conflict. */
import { nameplateBinWords } from '@/lib/quality/decision-rules';
import { parseSpec, specInputSchema, specIssueMessages } from '@/lib/quality/spec';
import { powerClassFields, powerClassFormOf } from '@/lib/schemas/power-class-form';
import type { PowerClassForm } from '@/lib/schemas/power-class-form';
import { classFormOf, mergeSpecForms, specFormOf } from '@/lib/schemas/spec-form';

const bins = (unit: 'w' | 'pct', rows: [string, string, string][], basis: 'pmp_w' | 'stc_pmp_w' = 'stc_pmp_w'): PowerClassForm => ({
  mode: 'nameplate_bins',
  step: '',
  basis,
  unit,
  rows: rows.map(([label, from, to]) => ({ label, from, to })),
});

describe('power classes: form ↔ spec', () => {
  it('rows in W become nameplate_bins in W (decimal comma and − read as numbers) and load back as typed', () => {
    const f = bins('w', [['C', '−5', '0'], ['B', '0', '2,5'], ['A', '2.5', '5']]);
    const out = powerClassFields(f);
    expect(out.problems).toEqual([]);
    expect(out.power_classes).toEqual({
      basis: 'stc_pmp_w',
      nameplate_bins: [
        { label: 'C', from_w: -5, to_w: 0 },
        { label: 'B', from_w: 0, to_w: 2.5 },
        { label: 'A', from_w: 2.5, to_w: 5 },
      ],
    });
    // The server's schema takes what the form sends.
    expect(parseSpec({ name: 'x', power_classes: out.power_classes }).power_classes).toEqual(out.power_classes);
    const back = powerClassFormOf(out.power_classes);
    expect(back.mode).toBe('nameplate_bins');
    expect(back.unit).toBe('w');
    expect(back.rows).toEqual([
      { label: 'C', from: '-5', to: '0' },
      { label: 'B', from: '0', to: '2.5' },
      { label: 'A', from: '2.5', to: '5' },
    ]);
  });

  it('rows in % become from_pct/to_pct on the chosen basis', () => {
    const out = powerClassFields(bins('pct', [['low', '-3', '0'], ['high', '0', '1.5']], 'pmp_w'));
    expect(out.power_classes).toEqual({ basis: 'pmp_w', nameplate_bins: [{ label: 'low', from_pct: -3, to_pct: 0 }, { label: 'high', from_pct: 0, to_pct: 1.5 }] });
    expect(powerClassFormOf(out.power_classes)).toMatchObject({ mode: 'nameplate_bins', unit: 'pct', basis: 'pmp_w', rows: [{ label: 'low', from: '-3', to: '0' }, { label: 'high', from: '0', to: '1.5' }] });
  });

  it('steps and none round-trip; classes the table cannot show are kept unchanged', () => {
    expect(powerClassFields(powerClassFormOf({ step_w: 5, basis: 'pmp_w' })).power_classes).toEqual({ step_w: 5, basis: 'pmp_w' });
    // What a steps version carries besides the step (set through the API) is saved again, not dropped.
    const full = { step_w: 5, basis: 'stc_pmp_w' as const, tolerance: { minus_w: 0, plus_w: 5 }, lowest_w: 390, highest_w: 410, label_prefix: 'Q' };
    expect(powerClassFields(powerClassFormOf(full)).power_classes).toEqual(full);
    // No basis saved: measured Pmax, as the engine reads it; a new spec starts on Pmax at STC.
    expect(powerClassFormOf({ step_w: 5 }).basis).toBe('pmp_w');
    expect(powerClassFormOf(undefined).basis).toBe('stc_pmp_w');
    expect(powerClassFields(powerClassFormOf(undefined))).toEqual({ problems: [] });
    const absolute = { bins: [{ label: 'X', nominal_w: 300, min_w: 295, max_w: 305 }] };
    const mixed = { nameplate_bins: [{ label: 'a', from_w: -3, to_w: 0 }, { label: 'b', from_pct: 0, to_pct: 2 }] };
    for (const pc of [absolute, mixed]) {
      const f = powerClassFormOf(pc);
      expect(f.mode).toBe('kept');
      expect(powerClassFields(f).power_classes).toEqual(pc);
    }
  });

  it.each([
    ['an empty label', [['', '0', '5']], 'Power class row 1 label: give the class a label, e.g. A'],
    ['from ≥ to', [['A', '5', '0']], 'Power class row 1 (A) from (W): the lower end +5 W must be below the upper end 0 W'],
    ['from = to', [['A', '2', '2']], 'Power class row 1 (A) from (W): the lower end +2 W must be below the upper end +2 W'],
    ['a word for a number', [['A', 'zero', '5']], 'Power class row 1 (A) from (W) must be a number (not "zero")'],
    ['a missing end', [['A', '0', '']], 'Power class row 1 (A) to (W): give the upper end'],
    ['a label used twice', [['A', '0', '5'], ['A', '5', '10']], 'Power class row 2 (A) label "A" is already used by row 1'],
    ['overlapping rows (in any order)', [['B', '3', '8'], ['A', '0', '5']], 'Power class row 1 (B) from (W): overlaps row 2 (A), which reaches +5 W; start it at +5 W or later'],
  ] as [string, [string, string, string][], string][])('refuses %s, naming the row and field', (_, rows, message) => {
    const out = powerClassFields(bins('w', rows));
    expect(out.power_classes).toBeUndefined();
    expect(out.problems).toEqual([message]);
  });

  it('refuses a % end below −100 %, no rows, and an empty or non-positive step', () => {
    expect(powerClassFields(bins('pct', [['A', '-120', '0']])).problems).toEqual(['Power class row 1 (A) from (%) must be at least −100 %']);
    expect(powerClassFields(bins('w', [])).problems).toEqual(['Power classes around the nameplate: add at least one row']);
    const steps = (step: string): PowerClassForm => ({ mode: 'steps', step, basis: 'pmp_w', unit: 'w', rows: [] });
    expect(powerClassFields(steps('')).problems).toEqual(['Power class step (W): give the step between nameplates, e.g. 5']);
    expect(powerClassFields(steps('-5')).problems).toEqual(['Power class step (W) must be above 0 W']);
  });

  it('a row may start exactly where another ends (a class holds from ≤ offset < to)', () => {
    expect(powerClassFields(bins('w', [['A', '0', '5'], ['B', '5', '10']])).problems).toEqual([]);
  });
});

describe('the API refuses overlapping bins around the nameplate too', () => {
  it('names the two bins and the field', () => {
    const r = specInputSchema.safeParse({ name: 'x', power_classes: { nameplate_bins: [{ label: 'A', from_w: 0, to_w: 5 }, { label: 'B', from_w: 4, to_w: 9 }] } });
    expect(r.success).toBe(false);
    expect(specIssueMessages(r.error!)).toEqual(['Power classes around the nameplate: bins "A" and "B" overlap (5 W > 4 W)']);
    // Bins in different units cannot be compared without the nameplate: allowed.
    expect(specInputSchema.safeParse({ name: 'x', power_classes: { nameplate_bins: [{ label: 'A', from_w: 0, to_w: 5 }, { label: 'B', from_pct: 1, to_pct: 2 }] } }).success).toBe(true);
  });
});

describe('bins in words', () => {
  it.each([
    [{ label: 'B', from_w: 0, to_w: 5 }, 'stc_pmp_w', 'Class B: Pmax at STC at least the nameplate and below nameplate + 5 W'],
    [{ label: 'C', from_w: -5, to_w: 0 }, 'pmp_w', 'Class C: Pmax at least nameplate − 5 W and below the nameplate'],
    [{ label: 'Class A', from_pct: 1.5, to_pct: 3 }, 'pmp_w', 'Class A: Pmax at least nameplate + 1.5 % and below nameplate + 3 %'],
  ] as const)('%j on %s', (b, basis, words) => {
    expect(nameplateBinWords(b, basis)).toBe(words);
  });
});

describe('re-applying my edits after a conflict keeps the rows with their unit', () => {
  const v1 = { name: 'M', limits: {}, power_classes: { basis: 'stc_pmp_w' as const, nameplate_bins: [{ label: 'A', from_w: 0, to_w: 5 }] } };

  it('my new rows win over their unchanged ones; their name change is kept', () => {
    const base = specFormOf(v1);
    const mine = { ...base, rows: [...base.rows, { label: 'B', from: '5', to: '10' }] };
    const theirs = specFormOf({ ...v1, name: 'M2' });
    const merged = mergeSpecForms(base, mine, theirs);
    expect(merged.name).toBe('M2');
    expect(powerClassFields(classFormOf(merged)).power_classes).toEqual({ basis: 'stc_pmp_w', nameplate_bins: [{ label: 'A', from_w: 0, to_w: 5 }, { label: 'B', from_w: 5, to_w: 10 }] });
  });

  it('their switch to % comes with their rows when I did not touch the table', () => {
    const base = specFormOf(v1);
    const theirs = specFormOf({ ...v1, power_classes: { basis: 'stc_pmp_w', nameplate_bins: [{ label: 'A', from_pct: 0, to_pct: 2 }] } });
    const merged = mergeSpecForms(base, { ...base, name: 'mine' }, theirs);
    expect(merged.name).toBe('mine');
    expect({ unit: merged.unit, rows: merged.rows }).toEqual({ unit: 'pct', rows: [{ label: 'A', from: '0', to: '2' }] });
  });
});
