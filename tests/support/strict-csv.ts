/**
 * A strict CSV reader for tests, written from RFC 4180 §2 (https://www.rfc-editor.org/rfc/rfc4180)
 * and independent of papaparse: a character-by-character state machine that refuses what a
 * forgiving reader would let through —
 *
 *  - a line break other than CRLF (a bare CR or LF outside quotes),
 *  - a quote inside an unquoted field, text after a closing quote, an unclosed quote,
 *  - a control character (other than CR, LF inside quotes, or TAB inside quotes) in a field,
 *  - a record whose field count differs from the header's (a stray note or caution row, a blank
 *    line between records),
 *  - an empty or repeated header name.
 *
 * The last record may or may not end with CRLF (RFC 4180 §2.2). Characters beyond ASCII are
 * allowed (the RFC's TEXTDATA is ASCII, but names such as "Ω" or "°C" are UTF-8 text here).
 */

export class StrictCsvError extends Error {
  constructor(
    message: string,
    readonly line: number,
  ) {
    super(`line ${line}: ${message}`);
    this.name = 'StrictCsvError';
  }
}

export type StrictCsv = {
  header: string[];
  /** Each data record, as many fields as the header. */
  rows: string[][];
  /** Each data record keyed by the header. */
  records: Record<string, string>[];
};

type State = 'fieldStart' | 'unquoted' | 'quoted' | 'quoteInQuoted' | 'afterCr';

/** Splits CSV text into records of fields by RFC 4180 alone; throws StrictCsvError at the first fault. */
export function readRecords(text: string): string[][] {
  const records: string[][] = [];
  let record: string[] = [];
  let field = '';
  let state: State = 'fieldStart';
  let line = 1;
  const endField = () => {
    record.push(field);
    field = '';
  };
  const endRecord = () => {
    endField();
    records.push(record);
    record = [];
  };
  for (let k = 0; k < text.length; k++) {
    const ch = text[k];
    const code = ch.charCodeAt(0);
    switch (state) {
      case 'afterCr':
        if (ch !== '\n') throw new StrictCsvError('a CR not followed by LF (records end with CRLF)', line);
        line++;
        endRecord();
        state = 'fieldStart';
        break;
      case 'fieldStart':
      case 'unquoted':
        if (ch === '"') {
          if (state === 'unquoted') throw new StrictCsvError(`a quote inside an unquoted field ("${field}")`, line);
          state = 'quoted';
        } else if (ch === ',') {
          endField();
          state = 'fieldStart';
        } else if (ch === '\r') {
          state = 'afterCr';
        } else if (ch === '\n') {
          throw new StrictCsvError('a line feed without CR (records end with CRLF)', line);
        } else if (code < 0x20 || code === 0x7f) {
          throw new StrictCsvError(`control character U+${code.toString(16).padStart(4, '0')} in an unquoted field`, line);
        } else {
          field += ch;
          state = 'unquoted';
        }
        break;
      case 'quoted':
        if (ch === '"') state = 'quoteInQuoted';
        else {
          if (code < 0x20 && ch !== '\r' && ch !== '\n' && ch !== '\t') throw new StrictCsvError(`control character U+${code.toString(16).padStart(4, '0')} in a quoted field`, line);
          if (ch === '\n') line++;
          field += ch;
        }
        break;
      case 'quoteInQuoted':
        if (ch === '"') {
          field += '"';
          state = 'quoted';
        } else if (ch === ',') {
          endField();
          state = 'fieldStart';
        } else if (ch === '\r') {
          state = 'afterCr';
        } else {
          throw new StrictCsvError(`text after a closing quote ("${field}" then ${JSON.stringify(ch)})`, line);
        }
        break;
    }
  }
  if (state === 'quoted') throw new StrictCsvError('a quoted field is not closed before the end of the file', line);
  if (state === 'afterCr') throw new StrictCsvError('the file ends with a CR without LF', line);
  // Text after the last CRLF is one more record; nothing after it means the file ended with CRLF.
  if (state !== 'fieldStart' || record.length > 0) endRecord();
  return records;
}

/**
 * Reads a CSV file with a header row (RFC 4180 §2.3) strictly: every record has exactly the
 * header's field count, and the header names are non-empty and distinct.
 */
export function readStrictCsv(text: string): StrictCsv {
  if (text.startsWith('\ufeff')) throw new StrictCsvError('a byte-order mark before the header', 1);
  const all = readRecords(text);
  if (!all.length) throw new StrictCsvError('no header row', 1);
  const [header, ...rows] = all;
  const seen = new Set<string>();
  for (const name of header) {
    if (!name) throw new StrictCsvError('an empty column name in the header', 1);
    if (seen.has(name)) throw new StrictCsvError(`the column "${name}" appears twice in the header`, 1);
    seen.add(name);
  }
  rows.forEach((r, k) => {
    if (r.length !== header.length) throw new StrictCsvError(`record ${k + 1} has ${r.length} field(s), the header ${header.length}: ${JSON.stringify(r).slice(0, 120)}`, k + 2);
  });
  return { header, rows, records: rows.map((r) => Object.fromEntries(header.map((h, j) => [h, r[j]]))) };
}
