/** The stored-text and date rules (lib/schemas/text.ts) shared by forms, routes and uploads. */
import { dateProblem, optDate, safeText, textProblem } from '@/lib/schemas/text';

describe('textProblem', () => {
  it.each<[string, string, { max: number; multiline?: boolean }, string | undefined]>([
    ['plain text', 'Lot 7 — Ω 🔆', { max: 120 }, undefined],
    ['a NUL', 'a\u0000b', { max: 120 }, 'contains a zero character (NUL)'],
    ['an escape', 'a\u001b[2Jb', { max: 120 }, 'contains a control character'],
    ['DEL', 'a\u007fb', { max: 120 }, 'contains a control character'],
    ['a C1 control', 'a\u0085b', { max: 120 }, 'contains a control character'],
    ['a line break in one-line text', 'a\nb', { max: 120 }, 'contains a control character'],
    ['line breaks and a tab in multi-line text', 'a\r\n\tb', { max: 120, multiline: true }, undefined],
    ['a NUL in multi-line text', 'a\u0000', { max: 120, multiline: true }, 'contains a zero character (NUL)'],
    // 120 emoji are 240 UTF-16 units but 120 characters as people count them.
    ['120 emoji', '🔆'.repeat(120), { max: 120 }, undefined],
    ['121 characters', 'x'.repeat(121), { max: 120 }, 'is longer than 120 characters (121)'],
  ])('%s', (_what, value, rule, expected) => {
    expect(textProblem(value, rule)).toBe(expected);
  });
});

describe('dates', () => {
  it.each<[string, string | undefined]>([
    ['2026-02-28', undefined],
    ['2028-02-29', undefined], // 2028 is a leap year (divisible by 4, not by 100)
    ['2026-02-29', 'Date 2026-02-29 is not a date in the calendar.'],
    ['2026-02-30', 'Date 2026-02-30 is not a date in the calendar.'],
    ['2100-02-29', 'Date 2100-02-29 is not a date in the calendar.'], // 2100 is not a leap year (divisible by 100, not 400)
    ['2026-13-01', 'Date 2026-13-01 is not a date in the calendar.'],
    ['2026-00-10', 'Date 2026-00-10 is not a date in the calendar.'],
    ['2026-04-31', 'Date 2026-04-31 is not a date in the calendar.'],
    ['0026-01-01', 'Date 0026-01-01 is not a date in the calendar.'],
    ['14/11/2025', 'Date must be written yyyy-mm-dd.'],
    ['2026-1-5', 'Date must be written yyyy-mm-dd.'],
  ])('%s', (value, expected) => {
    expect(dateProblem(value, 'Date')).toBe(expected);
  });

  it('optDate: empty and missing are null, a real date passes, a false one fails naming the label', () => {
    const s = optDate('Batch date');
    expect(s.parse('')).toBeNull();
    expect(s.parse(undefined)).toBeNull();
    expect(s.parse(' 2026-03-01 ')).toBe('2026-03-01');
    expect(s.safeParse('2026-02-30').error?.issues[0].message).toBe('Batch date 2026-02-30 is not a date in the calendar.');
  });
});

it('safeText trims, requires with its own message, and names the field', () => {
  const name = safeText('Name', { min: 1, max: 5, missing: 'Give a name.' });
  expect(name.parse('  abc  ')).toBe('abc');
  expect(name.safeParse('   ').error?.issues[0].message).toBe('Give a name.');
  expect(name.safeParse('abcdef').error?.issues[0].message).toBe('Name is longer than 5 characters (6).');
  expect(name.safeParse(42).error?.issues[0].message).toBe('Name must be text.');
});
