/**
 * The strict CSV reader the export tests rely on (tests/support/strict-csv.ts) must itself be
 * right: it reads the examples of RFC 4180 §2 as the RFC says and refuses what a forgiving reader
 * lets through — the old pass/fail file's caution row among them.
 */
import { readRecords, readStrictCsv, StrictCsvError } from '@/tests/support/strict-csv';

describe('readRecords() on the examples of RFC 4180 §2', () => {
  it.each([
    // §2.1/2.2: records end with CRLF; the last may or may not.
    ['aaa,bbb,ccc\r\nzzz,yyy,xxx\r\n', [['aaa', 'bbb', 'ccc'], ['zzz', 'yyy', 'xxx']]],
    ['aaa,bbb,ccc\r\nzzz,yyy,xxx', [['aaa', 'bbb', 'ccc'], ['zzz', 'yyy', 'xxx']]],
    // §2.5: fields may be quoted.
    ['"aaa","bbb","ccc"\r\nzzz,yyy,xxx', [['aaa', 'bbb', 'ccc'], ['zzz', 'yyy', 'xxx']]],
    // §2.6: line breaks, quotes and commas inside quoted fields.
    ['"aaa","b\r\nbb","ccc"\r\nzzz,yyy,xxx', [['aaa', 'b\r\nbb', 'ccc'], ['zzz', 'yyy', 'xxx']]],
    // §2.7: a quote inside a quoted field is doubled.
    ['"aaa","b""bb","ccc"', [['aaa', 'b"bb', 'ccc']]],
    // Empty fields, and text beyond ASCII.
    [',,\r\nΩ,°C,', [['', '', ''], ['Ω', '°C', '']]],
  ])('%j', (text, records) => {
    expect(readRecords(text)).toEqual(records);
  });
});

describe('readStrictCsv() refuses what a program could misread', () => {
  it.each([
    ['a bare LF', 'a,b\n1,2', /line feed without CR/],
    ['a bare CR', 'a,b\r1,2', /CR not followed by LF/],
    ['a quote inside an unquoted field', 'a,b\r\n1,x"y', /quote inside an unquoted field/],
    ['text after a closing quote', 'a,b\r\n"1"x,2', /text after a closing quote/],
    ['an unclosed quote', 'a,b\r\n"1,2', /not closed/],
    ['a row with fewer fields (a note after the table)', 'device_id,pmp_w\r\nM1,401\r\n"# High voltage DC: …"', /record 2 has 1 field/],
    ['a blank line between rows', 'a,b\r\n1,2\r\n\r\n3,4', /record 2 has 1 field/],
    ['a row with more fields', 'a,b\r\n1,2,3', /record 1 has 3 field/],
    ['a repeated column', 'a,a\r\n1,2', /appears twice/],
    ['an empty column name', 'a,\r\n1,2', /empty column name/],
    ['a control character', 'a,b\r\n1,\u0007', /control character/],
    ['a byte-order mark', '\ufeffa,b\r\n1,2', /byte-order mark/],
  ])('%s', (_what, text, message) => {
    expect(() => readStrictCsv(text)).toThrow(StrictCsvError);
    expect(() => readStrictCsv(text)).toThrow(message);
  });

  it('the pass/fail file as it was before issue 14 (a quoted caution row after the devices) is refused', () => {
    const old = 'device_id,result,pmp_w\r\nM1,pass,401\r\nM2,fail,390\r\n"# High voltage DC: modules are live in light, and cannot be switched off."\r\n';
    expect(() => readStrictCsv(old)).toThrow(/record 3 has 1 field/);
  });

  it('gives the records keyed by the header', () => {
    expect(readStrictCsv('device_id,name\r\nM1,"a, ""b""\r\nc"\r\n').records).toEqual([{ device_id: 'M1', name: 'a, "b"\r\nc' }]);
  });
});
