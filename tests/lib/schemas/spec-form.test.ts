/** The spec editor's re-apply after a conflict: my changes on top of the version saved meanwhile. */
import { mergeSpecForms, specFormOf } from '@/lib/schemas/spec-form';

const v1 = { name: 'Module release', limits: { pmp_w: { min: 300 }, ff: { min: 0.7 } }, fail_flags: ['step'] };

describe('mergeSpecForms', () => {
  it('keeps what I changed, takes everything else from the newer version', () => {
    const base = specFormOf(v1);
    // Mine: raised the Pmax minimum and added a Voc maximum.
    const mine = { ...base, limits: { ...base.limits, pmp_w: { min: '305', max: '' }, voc_v: { min: '', max: '43' } } };
    // Theirs (version 2): a tighter FF minimum, a power class step and another failing flag.
    const theirs = specFormOf({ ...v1, limits: { pmp_w: { min: 300 }, ff: { min: 0.72 } }, power_classes: { step_w: 5, basis: 'stc_pmp_w' }, fail_flags: ['step', 'fit-failed'] });
    const merged = mergeSpecForms(base, mine, theirs);
    expect(merged.limits.pmp_w).toEqual({ min: '305', max: '' });
    expect(merged.limits.voc_v).toEqual({ min: '', max: '43' });
    // FF is typed as a percentage in the form (0.72 → "72").
    expect(merged.limits.ff).toEqual({ min: '72', max: '' });
    expect(merged.step).toBe('5');
    expect(merged.flags).toEqual(['step', 'fit-failed']);
    expect(merged.name).toBe('Module release');
  });

  it('where both changed one bound, mine wins; flags ticked in another order are no change', () => {
    const base = specFormOf(v1);
    const mine = { ...base, limits: { ...base.limits, ff: { min: '71', max: '' } }, flags: ['step'] };
    const theirs = specFormOf({ ...v1, limits: { ...v1.limits, ff: { min: 0.73 } }, fail_flags: ['fit-failed', 'step'] });
    const merged = mergeSpecForms(base, mine, theirs);
    expect(merged.limits.ff.min).toBe('71');
    expect(merged.flags).toEqual(['fit-failed', 'step']);
  });
});
