/**
 * The one number reader of forms and requests (lib/schemas/numbers.ts). Every expected value is
 * the text's number as a person reads it (hand-checked), or "not given" / "not a number".
 */
import { z } from 'zod';
import { numberMessage, optNumber, optNumberOrNull, readNumber, reqNumber } from '@/lib/schemas/numbers';
import { batchCreateSchema, curveListQuerySchema, uploadOverridesSchema } from '@/lib/schemas/curves';
import { bandDiagramSchema, materialQuerySchema } from '@/lib/schemas/physics';
import { stringSizeSchema } from '@/lib/schemas/strings';

describe('readNumber', () => {
  it.each([
    // not given
    [undefined, undefined],
    [null, undefined],
    ['', undefined],
    ['   ', undefined],
    ['\t\n', undefined],
    // numbers as numbers
    [0, 0],
    [-3.5, -3.5],
    [1e16, 1e16],
    // plain text
    ['42', 42],
    ['  42  ', 42],
    ['+7', 7],
    ['-25', -25],
    ['.5', 0.5],
    ['5.', 5],
    // decimal comma
    ['1,5', 1.5],
    ['-0,25', -0.25],
    // typographic minus and en dash
    ['−25', -25],
    ['–25', -25],
    ['1e−3', 1e-3],
    // exponent notation
    ['1e16', 1e16],
    ['2.5E-3', 2.5e-3],
    ['1,5e3', 1500],
    // thousands grouped by spaces (also no-break and thin spaces)
    ['16 610', 16610],
    ['1 000 000', 1e6],
    ['16\u00a0610', 16610],
    ['16\u2009610,5', 16610.5],
  ])('%j → %p', (text, expected) => {
    expect(readNumber(text)).toBe(expected);
  });

  it.each([
    'sixty',
    '12 V',
    '1,000.5', // comma and point: which one is the decimal separator is anyone's guess
    '1,2,3',
    '1 5', // a space that does not separate a group of three digits
    '10 00',
    '0x10', // JavaScript's Number() reads these; people do not mean them
    '0b11',
    'Infinity',
    'NaN',
    '1_000',
    '1e',
    '--1',
    '.',
    '-',
  ])('%j is not a number', (text) => {
    expect(readNumber(text)).toBeNaN();
  });

  it('refuses non-finite numbers and other types', () => {
    expect(readNumber(Number.POSITIVE_INFINITY)).toBeNaN();
    expect(readNumber(Number.NaN)).toBeNaN();
    expect(readNumber(true)).toBeNaN();
    expect(readNumber({})).toBeNaN();
  });

  it('gives the same answer when called again (no state kept between calls)', () => {
    for (let k = 0; k < 3; k++) expect(readNumber('16 610')).toBe(16610);
  });
});

describe('the field builders', () => {
  const cells = optNumber('Cells in series', { min: 1, max: 1000, integer: true });
  const issue = (schema: z.ZodType, v: unknown) => {
    const r = schema.safeParse(v);
    return r.success ? null : r.error.issues[0].message;
  };

  it.each([
    [60, 60],
    ['60', 60],
    [' 1 000 ', 1000],
    ['', undefined],
    [null, undefined],
    [undefined, undefined],
  ])('optNumber reads %j as %p', (v, expected) => {
    expect(cells.parse(v)).toBe(expected);
  });

  it.each([['60.5'], ['0'], ['1001'], ['sixty'], [60.5]])('optNumber refuses %j with the rule in words', (v) => {
    expect(issue(cells, v)).toBe('Cells in series must be a whole number from 1 to 1000.');
  });

  it('bounds are inclusive', () => {
    expect(cells.parse('1')).toBe(1);
    expect(cells.parse('1000')).toBe(1000);
  });

  it('optNumberOrNull gives null for a missing value (a stored column is cleared)', () => {
    expect(optNumberOrNull('Area (cm²)', { min: 0.01 }).parse('')).toBeNull();
    expect(optNumberOrNull('Area (cm²)', { min: 0.01 }).parse('0,5')).toBe(0.5);
  });

  it('reqNumber refuses a missing value with its own message or the default', () => {
    expect(issue(reqNumber('System voltage limit (V)', {}, 'Enter the system voltage limit.'), '')).toBe('Enter the system voltage limit.');
    expect(issue(reqNumber('temp_k', { unit: 'K' }), undefined)).toBe('temp_k is required (K).');
    expect(reqNumber('temp_k', { unit: 'K' }).parse('300')).toBe(300);
  });

  it.each([
    ['x', {}, 'x must be a number.'],
    ['x', { unit: 'K' }, 'x must be a number (K).'],
    ['x', { min: 0 }, 'x must be a number of at least 0.'],
    ['x', { max: 5 }, 'x must be a number of at most 5.'],
    ['x', { min: 1, max: 2, integer: true }, 'x must be a whole number from 1 to 2.'],
  ] as const)('numberMessage(%j, %j)', (label, rule, message) => {
    expect(numberMessage(label, rule)).toBe(message);
  });
});

describe('every schema reads numbers the same way', () => {
  // The same typed text through each form's schema: one reader, one answer.
  it.each([
    ['1,5', 1.5],
    ['−2', -2],
    ['1 000', 1000],
  ])('%j', (text, expected) => {
    // Each schema's own bounds apply afterwards: the area must be positive.
    if (expected > 0) expect(uploadOverridesSchema.parse({ area_cm2: text }).area_cm2).toBe(expected);
    else expect(uploadOverridesSchema.parse({ temp_c: text }).temp_c).toBe(expected);
    expect(stringSizeSchema.parse({ t_min_c: text, v_sys_v: '1500' }).t_min_c).toBe(expected);
    expect(bandDiagramSchema.parse({ type: 'p', doping_cm3: '1e16', temp_k: '300', excess_cm3: text }).excess_cm3).toBe(expected);
  });

  it('a number that is not one is refused by each', () => {
    expect(batchCreateSchema.safeParse({ name: 'b', area_cm2: '0x10' }).success).toBe(false);
    expect(stringSizeSchema.safeParse({ t_min_c: '0x10', v_sys_v: '1500' }).success).toBe(false);
    expect(bandDiagramSchema.safeParse({ type: 'p', doping_cm3: '0x10', temp_k: '300' }).success).toBe(false);
    expect(curveListQuerySchema.safeParse({ page: '0x10' }).success).toBe(false);
  });

  it('defaults stay: page 1, 50 a page, 300 K', () => {
    expect(curveListQuerySchema.parse({})).toMatchObject({ page: 1, page_size: 50 });
    expect(materialQuerySchema.parse({}).temp_k).toBe(300);
    expect(curveListQuerySchema.safeParse({ page_size: '501' }).success).toBe(false);
  });
});
