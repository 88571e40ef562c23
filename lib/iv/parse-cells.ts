/** Rows, cells and numbers of I-V text: separators, quoted cells, numeric cells, quoting file text in messages. */
import { IvInputError } from '@/lib/iv/errors';

export type Separator = '\t' | ';' | ',' | 'space';

export const NUMBER_RE = /^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$/;
const NON_FINITE_RE = /^[+-]?(nan|inf|infinity|#num!|#div\/0!)$/i;

export function detectSeparator(line: string): Separator {
  if (line.includes('\t')) return '\t';
  if (line.includes(';')) return ';';
  if (line.includes(',')) return ',';
  return 'space';
}

export function splitRow(line: string, sep: Separator): string[] {
  const cells = sep === 'space' ? splitWhitespace(line) : splitOutsideQuotes(line, sep);
  return cells.map((c) => c.trim().replace(/^"(.*)"$/, '$1').trim());
}

/** Splits on runs of whitespace, keeping a unit in brackets with its name: "Voltage (mV)   Current [A]". */
function splitWhitespace(line: string): string[] {
  const cells: string[] = [];
  for (const token of line.trim().split(/\s+/)) {
    if (/^[([]/.test(token) && cells.length) cells[cells.length - 1] += ` ${token}`;
    else cells.push(token);
  }
  return cells;
}

/** Splits on `sep` outside double quotes (RFC 4180), so a quoted "0,512" or "1,234.5" stays one cell. */
function splitOutsideQuotes(line: string, sep: string): string[] {
  if (!line.includes('"')) return line.split(sep);
  const cells: string[] = [];
  let start = 0;
  let quoted = false;
  for (let k = 0; k < line.length; k++) {
    if (line[k] === '"') quoted = !quoted;
    else if (line[k] === sep && !quoted) {
      cells.push(line.slice(start, k));
      start = k + 1;
    }
  }
  cells.push(line.slice(start));
  return cells;
}

/** Longest piece of file text quoted in a message: a 1 MB cell must not make a 1 MB message. */
const QUOTED_CHARS = 60;

/** `text` cut for a message, saying how long it really is. */
export function clip(text: string, max = QUOTED_CHARS): string {
  return text.length > max ? `${text.slice(0, max)}… (${text.length.toLocaleString('en-US')} characters)` : text;
}

/** Excel's "sep=;" first line names the separator. */
export const EXCEL_SEP_RE = /^"?sep=([,;\t ])"?$/i;

/** Parses one numeric cell; `decimalComma` turns "0,512" into 0.512. */
export function parseNumber(raw: string, decimalComma: boolean, what: string, lineNo: number): number {
  const s = decimalComma ? raw.replace(',', '.') : raw;
  if (s === '') throw new IvInputError('missing-value', `the ${what} value is empty`, lineNo);
  if (NON_FINITE_RE.test(s)) throw new IvInputError('non-finite', `the ${what} value "${clip(raw)}" is not a finite number`, lineNo);
  if (!NUMBER_RE.test(s)) {
    const hint = !decimalComma && /^[+-]?\d+,\d+$/.test(raw) ? ' (decimal commas are accepted only in semicolon-separated files)' : '';
    throw new IvInputError('not-a-number', `the ${what} value "${clip(raw)}" is not a number${hint}`, lineNo);
  }
  const value = Number(s);
  if (!Number.isFinite(value)) throw new IvInputError('non-finite', `the ${what} value "${clip(raw)}" is too large to be a finite number`, lineNo);
  return value;
}
