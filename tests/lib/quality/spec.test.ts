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
    [{ name: 'x', limits: { rs_mohm: { max: 1 } } }, /^limits: unknown parameter "rs_mohm"; known: isc_a, voc_v/],
    [{ name: 'x', limits: { rs_ohm: { min: 2, max: 1 } } }, /^limits\.rs_ohm: min \(2\) is greater than max \(1\)$/],
    [{ name: 'x', limits: { rs_ohm: {} } }, /^limits\.rs_ohm: give min, max or both$/],
    [{ name: 'x', limits: { rs_ohm: { maximum: 1 } } }, /^limits\.rs_ohm: unknown limit field "maximum"/],
    [{ name: 'x', limits: { rs_ohm: { max: '0.5' } } }, /^limits\.rs_ohm\.max: max must be a finite number$/],
    [{ name: 'x', limits: { rs_ohm: { max: Infinity } } }, /max must be a finite number/],
    [{ name: '', limits: {} }, /^name: name is required$/],
    [{ limits: {} }, /^name: name is required$/],
    [{ name: 'x', limit: {} }, /^unknown spec field "limit"/],
    [{ name: 'x', power_classes: {} }, /^power_classes\.step_w: give step_w/],
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
    [{ name: 'x', fail_flags: [''] }, /^fail_flags\.0: a flag code cannot be empty$/],
  ])('rejects %j with a clear message', (input, message) => {
    expect(issues(input).some((m) => message.test(m))).toBe(true);
  });

  it('lists every problem, not only the first', () => {
    const all = issues({ name: 'x', limits: { rs_ohm: { min: 2, max: 1 }, voc_v: { min: 50, max: 40 } } });
    expect(all).toHaveLength(2);
  });

  it('parseSpec throws QualityError carrying the messages', () => {
    expect(() => parseSpec({ name: 'x', limits: { foo: { min: 1 } } })).toThrow(QualityError);
    expect(() => parseSpec({ name: 'x', limits: { foo: { min: 1 } } })).toThrow(/invalid spec: limits: unknown parameter "foo"/);
  });
});
