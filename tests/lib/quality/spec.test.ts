import { QualityError } from '@/lib/quality/errors';
import { parseSpec, specInputSchema, specIssueMessages } from '@/lib/quality/spec';

function issues(input: unknown): string[] {
  const r = specInputSchema.safeParse(input);
  if (r.success) throw new Error('expected the spec to be rejected');
  return specIssueMessages(r.error);
}

describe('specInputSchema', () => {
  it('accepts limits on engine keys, step power classes, flags and notes', () => {
    const spec = parseSpec({
      name: '  Line 3 mono 400 W  ',
      limits: { pmp_w: { min: 395 }, rs_ohm: { max: 0.5 }, ff: { min: 0.74, max: 0.85 } },
      power_classes: { step_w: 5, tolerance: { minus_w: 0, plus_w: 5 } },
      fail_flags: ['step_in_curve'],
      notes: 'customer X',
    });
    expect(spec.name).toBe('Line 3 mono 400 W');
    expect(spec.limits.ff).toEqual({ min: 0.74, max: 0.85 });
  });

  it('defaults limits to none and accepts explicit bins', () => {
    const spec = parseSpec({
      name: 'bins',
      power_classes: { bins: [{ label: 'A', nominal_w: 400, min_w: 400, max_w: 405 }, { label: 'B', nominal_w: 405, min_w: 405, max_w: 410 }] },
    });
    expect(spec.limits).toEqual({});
  });

  it.each([
    [{ name: 'x', limits: { rs_mohm: { max: 1 } } }, /^Limits: unknown parameter "rs_mohm"; known: isc_a, voc_v/],
    // Fields named as the spec editor labels them (key table), bounds shown as on screen.
    [{ name: 'x', limits: { rs_ohm: { min: 2, max: 1 } } }, /^Rs \(Ω\): the minimum 2 Ω is above the maximum 1 Ω$/],
    [{ name: 'x', limits: { ff: { min: 0.8, max: 0.7 } } }, /^FF \(%\): the minimum 80\.0 % is above the maximum 70\.0 %$/],
    [{ name: 'x', limits: { rs_ohm: {} } }, /^Rs \(Ω\): give a minimum, a maximum or both$/],
    [{ name: 'x', limits: { rs_ohm: { maximum: 1 } } }, /^Rs \(Ω\): unknown limit field "maximum"/],
    [{ name: 'x', limits: { rs_ohm: { max: '0.5' } } }, /^Rs \(Ω\) maximum must be a number$/],
    [{ name: 'x', limits: { stc_pmp_w: { min: Infinity } } }, /^Pmax at STC \(W\) minimum must be a number$/],
    [{ name: '', limits: {} }, /^Give the spec a name\.$/],
    [{ limits: {} }, /^Give the spec a name\.$/],
    [{ name: 'x', limit: {} }, /^unknown spec field "limit"/],
    [{ name: 'x', power_classes: {} }, /^Power class step \(W\): give step_w/],
    [{ name: 'x', power_classes: { step_w: 5, tolerance: { minus_w: 0, plus_w: 3 } } }, /must equal step_w \(5 W\)/],
    [{ name: 'x', power_classes: { step_w: 5, lowest_w: 402 } }, /lowest_w \(402 W\) must be a multiple of step_w/],
    [{ name: 'x', power_classes: { step_w: 5, lowest_w: 410, highest_w: 400 } }, /lowest_w \(410 W\) is above highest_w/],
    [
      { name: 'x', power_classes: { step_w: 5, bins: [{ label: 'A', nominal_w: 400, min_w: 400, max_w: 405 }] } },
      /give either bins or step_w-based classes, not both/,
    ],
    [
      { name: 'x', power_classes: { bins: [{ label: 'A', nominal_w: 400, min_w: 400, max_w: 406 }, { label: 'B', nominal_w: 405, min_w: 405, max_w: 410 }] } },
      /bins "A" and "B" overlap/,
    ],
    [{ name: 'x', power_classes: { bins: [{ label: 'A', nominal_w: 400, min_w: 405, max_w: 400 }] } }, /min_w \(405\) must be below max_w \(400\)/],
    [{ name: 'x', fail_flags: [''] }, /^Failing flag 1: a flag code cannot be empty$/],
  ])('rejects %j with a clear message', (input, message) => {
    expect(issues(input).some((m) => message.test(m))).toBe(true);
  });

  it('lists every problem, not only the first', () => {
    const all = issues({ name: 'x', limits: { rs_ohm: { min: 2, max: 1 }, voc_v: { min: 50, max: 40 } } });
    expect(all).toHaveLength(2);
  });

  it('parseSpec throws QualityError carrying the messages', () => {
    expect(() => parseSpec({ name: 'x', limits: { foo: { min: 1 } } })).toThrow(QualityError);
    expect(() => parseSpec({ name: 'x', limits: { foo: { min: 1 } } })).toThrow(/invalid spec: Limits: unknown parameter "foo"/);
  });
});
