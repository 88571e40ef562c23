/**
 * The hostile-input corpus: bad or odd I-V files made by the tests, each with what the upload
 * route must do with it — store it (it is in fact readable) or refuse it with a message that
 * names the problem. Built once per test file (the 12 MB and 100,001-row files take a moment).
 *
 * The readable curve all variants start from is the 57 mm cell of Easwarakhanthan et al. (1986),
 * simulated from its published true-current single-diode optimum
 * (tests/fixtures/reference-data/README.md: Iph 0.760788 A, I0 3.1068e-7 A, n 1.47727,
 * Rs 0.036547 Ω, Rsh 52.890 Ω, 33 °C, one cell).
 */
import { MAX_DATA_ROWS, MAX_FILE_BYTES, simulateCurve } from '@/lib/iv';

/** What the API must answer for one file uploaded alone. */
export type CorpusExpectation =
  | { accept: true; /** the device id the stored curve must carry, byte for byte */ deviceId?: string }
  | { accept: false; /** the message (per-file error, or the request's message) must match */ message: RegExp; /** request status when not 422 */ status?: 400 | 413 };

export type CorpusEntry = {
  /** What the case is, for the test's name. */
  name: string;
  /** The file name sent in the multipart part. */
  fileName: string;
  bytes: Buffer;
  expect: CorpusExpectation;
};

/** Published true-current optimum of the benchmark cell (reference-data README). */
const CELL = { iph_a: 0.760788, i0_a: 3.1068e-7, n: 1.47727, rs_ohm: 0.036547, rsh_ohm: 52.89 };

/** The readable curve: 40 points from 0 V to 1.02·Voc (past open circuit), no noise. */
const base = simulateCurve(CELL, { cells: 1, temp_c: 33, points: 40 });
const V = base.voltage_v.map((v) => Number(v.toPrecision(6)));
const I = base.current_a.map((i) => Number(i.toPrecision(6)));

type Fmt = (v: number, i: number, k: number) => string;
const rows = (fmt: Fmt) => V.map((v, k) => fmt(v, I[k], k));
const csv = (header: string, fmt: Fmt = (v, i) => `${v},${i}`, eol = '\n') => [header, ...rows(fmt)].join(eol) + eol;
const good = csv('V,I');
const utf8 = (s: string) => Buffer.from(s, 'utf8');
const accept = (deviceId?: string): CorpusExpectation => ({ accept: true, ...(deviceId !== undefined ? { deviceId } : {}) });
const reject = (message: RegExp, status?: 400 | 413): CorpusExpectation => ({ accept: false, message, ...(status ? { status } : {}) });
/** The good file with data line `k` (0-based among data rows) replaced. */
const withRow = (k: number, row: string, header = 'V,I') => {
  const r = rows((v, i) => `${v},${i}`);
  r[k] = row;
  return [header, ...r].join('\n') + '\n';
};

/** 100,001 data rows (one more than MAX_DATA_ROWS): a long sweep written by a fast tracer. */
function tooManyRows(): Buffer {
  const n = MAX_DATA_ROWS + 1;
  const parts: string[] = ['V,I'];
  for (let k = 0; k < n; k++) parts.push(`${((k / n) * 0.6).toFixed(7)},${(0.76 - (k / n) * 0.8).toFixed(6)}`);
  return utf8(parts.join('\n') + '\n');
}

/** A 12 MB text file (over the 10 MB limit) of plausible rows. */
function twelveMegabytes(): Buffer {
  const row = '0.1234567,0.7512345\n';
  const target = 12 * 1024 * 1024;
  return utf8('V,I\n' + row.repeat(Math.ceil(target / row.length)));
}

/** Builds every entry; call once per test file. */
export function buildCorpus(): CorpusEntry[] {
  const entries: CorpusEntry[] = [];
  const add = (name: string, fileName: string, bytes: Buffer | string, expect: CorpusExpectation) =>
    entries.push({ name, fileName, bytes: typeof bytes === 'string' ? utf8(bytes) : bytes, expect });

  // ---- Not text at all
  add('empty file', 'empty.csv', Buffer.alloc(0), reject(/empty/i));
  add('only blank lines and spaces', 'blank.csv', '  \n\n\t\n   \n', reject(/no header row/i));
  add('PNG image renamed .csv', 'photo.csv', Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 0x0d, 0x49, 0x48, 0x44, 0x52]), reject(/binary/i));
  add('xlsx workbook renamed .csv', 'sheet.csv', Buffer.from([0x50, 0x4b, 0x03, 0x04, 0x14, 0x00, 0x06, 0x00, 0x08, 0x00]), reject(/zip archive|workbook|\.xlsx/i));
  add('random bytes with a zero byte', 'noise.dat', Buffer.from(Array.from({ length: 512 }, (_, k) => (k * 73 + 11) % 256)), reject(/binary|UTF-8/i));
  add('a zero byte in the middle of the data', 'nul.csv', Buffer.concat([utf8(good.slice(0, 30)), Buffer.from([0]), utf8(good.slice(30))]), reject(/binary|zero/i));
  add('UTF-16 without byte-order mark', 'utf16-nobom.csv', Buffer.from(good, 'utf16le'), reject(/binary|zero/i));
  add('Latin-1 text (non-UTF-8 "°" and "é")', 'latin1.csv', Buffer.from(`# Température: 33 \xb0C\n${good}`, 'latin1'), reject(/not valid UTF-8/i));
  add('invalid UTF-8: overlong encoding', 'overlong.csv', Buffer.concat([utf8('# note: '), Buffer.from([0xc0, 0xaf]), utf8('\n' + good)]), reject(/not valid UTF-8/i));
  add('invalid UTF-8: encoded surrogate half', 'surrogate.csv', Buffer.concat([utf8('# note: '), Buffer.from([0xed, 0xa0, 0x80]), utf8('\n' + good)]), reject(/not valid UTF-8/i));
  add('invalid UTF-8: truncated sequence at the end', 'truncated.csv', Buffer.concat([utf8(good), Buffer.from([0xe2, 0x82])]), reject(/not valid UTF-8/i));

  // ---- Wrong kind of file by name
  add('.xlsx extension', 'flash.xlsx', good, reject(/not an I-V text file/));
  add('.exe extension', 'setup.exe', good, reject(/not an I-V text file/));
  add('no extension', 'README', good, reject(/not an I-V text file/));
  add('double extension ending in .php', 'curve.csv.php', good, reject(/not an I-V text file/));

  // ---- Header problems
  add('only a header', 'header-only.csv', 'V,I\n', reject(/only 0 data rows.*at least 10 points/i));
  add('only a header, CRLF', 'header-only-crlf.csv', 'Voltage (V),Current (A)\r\n\r\n', reject(/only 0 data rows/i));
  add('numbers without a header', 'no-header.csv', rows((v, i) => `${v},${i}`).join('\n'), reject(/expected a header row/i));
  add('no current column', 'no-current.csv', csv('Voltage,Temperature', (v) => `${v},33`), reject(/no current column/i));
  add('no voltage column', 'no-voltage.csv', csv('Time,Current', (v, i, k) => `${k},${i}`), reject(/no voltage column/i));
  add('header row repeated inside the data (two files pasted together)', 'pasted.csv', good + good, reject(/line 42: the voltage value "V" is not a number/));
  add('header row written twice at the top', 'header-twice.csv', 'V,I\n' + good, reject(/line 2: the voltage value "V" is not a number/));
  add('formula as the only header', 'formula-header.csv', csv('=SUM(A1:A9),=1+1'), reject(/no voltage column/i));
  // Lines without a separator before any table are title lines of a header block: the error names the last one.
  add('HTML page saved as .csv', 'page.csv', '<!doctype html>\n<html><body><table><tr><td>V</td><td>I</td></tr></table></body></html>\n', reject(/line 2: no header row naming a voltage and a current column/i));
  add('a header block and no table', 'block-only.csv', 'Module ID,KX-1\nIrradiance,1000,W/m2\n\nOperator,J. Doe\n', reject(/line 4: no header row naming a voltage and a current column/));
  add('JSON saved as .csv', 'data.json.csv', JSON.stringify({ V: V.slice(0, 3), I: I.slice(0, 3) }) + '\n', reject(/only 0 data rows/i));
  add('only comment lines', 'comments.csv', '# device: X-1\n# temperature: 25\n// nothing else\n', reject(/no header row/i));

  // ---- Too little or too much
  add('one point', 'one-point.csv', 'V,I\n0,0.76\n', reject(/only 1 data row/i));
  add('nine points (one short)', 'nine.csv', ['V,I', ...rows((v, i) => `${v},${i}`).filter((_, k) => k % 4 === 0).slice(0, 9)].join('\n'), reject(/only 9 data rows.*at least 10/i));
  add('40 rows but a single voltage', 'one-voltage.csv', csv('V,I', (_v, i) => `0.3,${i}`), reject(/only 1 distinct voltage/i));
  add('100,001 data rows', 'long-sweep.csv', tooManyRows(), reject(/more than 100,000 data rows/));
  add('12 MB file', 'huge.csv', twelveMegabytes(), reject(new RegExp(`larger than the ${MAX_FILE_BYTES / 1024 / 1024} MB limit`), 413));

  // ---- Bad numbers
  add('NaN current', 'nan.csv', withRow(5, `${V[5]},NaN`), reject(/line 7: the current value "NaN" is not a finite number/));
  add('Infinity voltage', 'inf.csv', withRow(5, `Infinity,${I[5]}`), reject(/line 7: the voltage value "Infinity" is not a finite number/));
  add('-inf current', 'minus-inf.csv', withRow(3, `${V[3]},-inf`), reject(/"-inf" is not a finite number/));
  add('spreadsheet #DIV/0! error', 'div0.csv', withRow(8, `${V[8]},#DIV/0!`), reject(/"#DIV\/0!" is not a finite number/));
  add('number too large (1e999)', 'overflow.csv', withRow(2, `1e999,${I[2]}`), reject(/"1e999" is too large to be a finite number/));
  add('text in a number', 'text.csv', withRow(4, `${V[4]},abc`), reject(/line 6: the current value "abc" is not a number/));
  add('formula in a number cell', 'formula-cell.csv', withRow(4, `=1+1,${I[4]}`), reject(/the voltage value "=1\+1" is not a number/));
  add('empty current cell', 'empty-cell.csv', withRow(6, `${V[6]},`), reject(/line 8: the current value is empty/));
  add('row with one column', 'short-row.csv', withRow(6, `${V[6]}`), reject(/line 8: expected at least 2 columns/));
  add('mixed units: a unit written in a cell', 'unit-in-cell.csv', withRow(10, `${V[10] * 1000} mV,${I[10]}`), reject(/line 12: the voltage value ".* mV" is not a number/));
  add('mixed units: current density column', 'density.csv', csv('Voltage (V),Current (mA/cm2)'), reject(/current density/i));
  add('unknown voltage unit', 'furlongs.csv', csv('Voltage (furlongs),Current (A)'), reject(/unknown voltage unit "furlongs"/));
  add('decimal commas in a comma-separated file, quoted', 'comma-quoted.csv', csv('V,I', (v, i) => `"${String(v).replace('.', ',')}","${String(i).replace('.', ',')}"`), reject(/line 2: the current value "0,760\d*" is not a number \(decimal commas are accepted only in semicolon-separated files\)/));
  add('decimal commas in a comma-separated file, unquoted', 'comma-bare.csv', csv('V,I', (v, i) => `${v.toFixed(4).replace('.', ',')},${i.toFixed(4).replace('.', ',')}`), reject(/line 2: 4 values under the 2 columns of the header on line 1: a decimal comma in a comma-separated file splits a number in two/));
  add('one decimal comma among decimal points', 'one-comma.csv', withRow(7, `${V[7]},${String(I[7]).replace('.', ',')}`), reject(/line 9: 3 values under the 2 columns .* decimal comma/));
  add('thousands separators (quoted) in µV', 'thousands.csv', csv('Voltage (uV),Current (A)', (v, i) => `"${(v * 1e6).toLocaleString('en-US', { maximumFractionDigits: 1 })}",${i}`), reject(/the voltage value "\d{1,3},\d{3}(\.\d)?" is not a number/));

  // ---- Curves that are not I-V curves of a lit device
  add('dark curve (current never positive)', 'dark.csv', csv('V,I', (v) => `${v},${-(1e-9 * Math.expm1(v / 0.026)).toPrecision(6)}`), reject(/never positive/));
  add('sweep stops before open circuit', 'no-voc.csv', ['V,I', ...rows((v, i) => `${v},${i}`).slice(0, 25)].join('\n'), reject(/never falls to zero.*no Voc/));
  add('sweep starts far above 0 V', 'no-isc.csv', ['V,I', ...rows((v, i) => `${v},${i}`).slice(12)].join('\n'), reject(/never reaches 0 V/));

  // ---- Bad metadata
  add('temperature is text', 'temp-text.csv', '# temperature: hot\n' + good, reject(/line 1: metadata "temperature" should be a number/));
  add('temperature out of range', 'temp-900.csv', '# cell temperature: 900 °C\n' + good, reject(/cell temperature must lie between/));
  add('negative irradiance', 'irr-neg.csv', '# irradiance: -1000 W/m2\n' + good, reject(/irradiance must be above 0/));
  add('fractional cell count', 'cells-frac.csv', '# cells in series: 36.5\n' + good, reject(/whole number/));
  add('area in an unknown unit', 'area-acre.csv', '# area: 3 acres\n' + good, reject(/area must be in/));
  add('empty device id', 'no-id.csv', '# device:\n' + good, reject(/metadata "device" is empty/));
  add('NaN temperature', 'temp-nan.csv', '# temperature: NaN\n' + good, reject(/should be a number/));
  add('an escape sequence in the device id', 'id-escape.csv', '# device: MOD-\u001b[2J-1\n' + good, reject(/device id of id-escape\.csv contains a control character/));
  add('a device id of 121 characters', 'id-long.csv', `# device: ${'M'.repeat(121)}\n` + good, reject(/device id of id-long\.csv is longer than 120 characters/));

  // ---- Very long lines
  add('a 1 MB header line of unknown columns', 'wide-header.csv', 'x'.repeat(40) + `,col`.repeat(250_000) + '\n' + rows((v, i) => `${v},${i}`).join('\n') + '\n', reject(/line 1: no voltage column/i));
  // Before a real table the same line is a metadata line: kept, its value cut to 200 characters.
  add('a 1 MB metadata line before the table', 'wide-meta.csv', 'x'.repeat(40) + `,col`.repeat(250_000) + '\n' + good, accept('wide-meta'));
  add('a 1 MB data line of unnamed values', 'wide-row.csv', withRow(20, `${V[20]},${I[20]}` + ',0'.repeat(500_000)), reject(/line 22: 500,002 values under the 2 columns/));
  add('a 1 MB number in one cell', 'long-number.csv', withRow(3, `${V[3]},0.${'7'.repeat(1_000_000)}x`), reject(/line 5: the current value .* is not a number/));

  // ---- Odd but readable: must be stored
  add('good comma CSV', 'plain.csv', good, accept('plain'));
  add('UTF-8 byte-order mark', 'bom.csv', '\uFEFF' + good, accept('bom'));
  add('UTF-16LE with byte-order mark', 'utf16.csv', Buffer.concat([Buffer.from([0xff, 0xfe]), Buffer.from(good, 'utf16le')]), accept('utf16'));
  add('CRLF line ends', 'crlf.csv', csv('V,I', undefined, '\r\n'), accept('crlf'));
  add('CR-only line ends (old Mac)', 'cr.csv', csv('V,I', undefined, '\r'), accept('cr'));
  add('mixed line ends', 'mixed-eol.csv', ['V,I', ...rows((v, i) => `${v},${i}`)].map((l, k) => l + (k % 2 ? '\r\n' : '\n')).join(''), accept('mixed-eol'));
  add('tab-separated', 'tabs.tsv', csv('Voltage\tCurrent', (v, i) => `${v}\t${i}`), accept('tabs'));
  add('whitespace-separated with runs of spaces', 'spaces.txt', csv('voltage   current', (v, i) => `  ${v}     ${i}  `), accept('spaces'));
  add('whitespace-separated, units in brackets after a space', 'spaces-units.txt', csv('Voltage (mV)   Current [mA]', (v, i) => `${v * 1000}   ${i * 1000}`), accept('spaces-units'));
  add('semicolons with decimal commas, mV and mA', 'eu.csv', csv('Spannung;Voltage (mV);Current (mA)', (v, i) => `x;${(v * 1000).toFixed(3).replace('.', ',')};${(i * 1000).toFixed(3).replace('.', ',')}`), accept('eu'));
  add('load convention (current negative while delivering power)', 'load.csv', csv('V,I', (v, i) => `${v},${-i}`), accept('load'));
  add('descending sweep', 'descending.csv', ['V,I', ...rows((v, i) => `${v},${i}`).reverse()].join('\n'), accept('descending'));
  add('voltage not monotonic (points shuffled)', 'shuffled.csv', ['V,I', ...rows((v, i) => `${v},${i}`).map((r, k) => ({ r, key: (k * 17) % 40 })).sort((a, b) => a.key - b.key).map((x) => x.r)].join('\n'), accept('shuffled'));
  add('voltage not monotonic (forward and back sweep)', 'hysteresis.csv', ['V,I', ...rows((v, i) => `${v},${i}`), ...rows((v, i) => `${v},${i}`).reverse()].join('\n'), accept('hysteresis'));
  add('duplicated voltage column names: the first is read', 'two-v.csv', csv('V,I,V', (v, i) => `${v},${i},${v * 1000}`), accept('two-v'));
  add('Excel "sep=;" first line, decimal commas', 'excel-sep.csv', 'sep=;\n' + csv('U;I', (v, i) => `${String(v).replace('.', ',')};${String(i).replace('.', ',')}`), accept('excel-sep'));
  add('quoted header and cells', 'quoted.csv', csv('"Voltage [V]","Current [A]"', (v, i) => `"${v}","${i}"`), accept('quoted'));
  add('exponent notation and explicit plus signs', 'exp.csv', csv('V,I', (v, i) => `+${v.toExponential(5)},${i >= 0 ? '+' : ''}${i.toExponential(5)}`), accept('exp'));
  add('comments and blank lines among the data', 'comments-inside.csv', ['V,I', ...rows((v, i) => `${v},${i}`).flatMap((r, k) => (k % 10 === 5 ? [r, '', '# pause'] : [r]))].join('\n'), accept('comments-inside'));
  add('extra columns, swapped order', 'extra.csv', csv('t_s,Current (A),T,Voltage (V),P', (v, i, k) => `${k * 0.01},${i},33.0,${v},${v * i}`), accept('extra'));
  add('formula-like device id =HYPERLINK(...)', 'hyperlink.csv', '# device: =HYPERLINK("http://evil.example/x","click")\n' + good, accept('=HYPERLINK("http://evil.example/x","click")'));
  add('formula-like device id starting with +', 'plus-id.csv', "# device: +cmd|' /C calc'!A0\n" + good, accept("+cmd|' /C calc'!A0"));
  add('formula-like device id starting with @', 'at-id.csv', '# device: @SUM(1+1)*cmd\n' + good, accept('@SUM(1+1)*cmd'));
  add('formula-like device id starting with -', 'minus-id.csv', '# serial: -2+3\n' + good, accept('-2+3'));
  add('formula-like file name used as the id', '=1+2.csv', good, accept('=1+2'));
  add('SQL-looking device id', 'sql-id.csv', "# device: x'); DROP TABLE curve;--\n" + good, accept("x'); DROP TABLE curve;--"));
  add('HTML in the device id', 'html-id.csv', '# device: <img src=x onerror=alert(1)>\n' + good, accept('<img src=x onerror=alert(1)>'));
  add('non-ASCII device id', 'unicode-id.csv', '# device: Modul-Ä-Ω-测试-🔆\n' + good, accept('Modul-Ä-Ω-测试-🔆'));
  add('a tester’s key,value header block, a title and a blank line before the table', 'block.csv', 'Flash report\nModule ID,KX-1\nIrradiance,1000,W/m2\nTemperature (°C),25\nCells,1\nOperator,"Doe, J."\n\n' + good, accept('KX-1'));
  add('metadata in units: K, kW/m², m², with decimal comma', 'meta-units.csv', '# temperature: 306,15 K\n# irradiance: 1 kW/m2\n# area: 0,00255 m²\n' + good, accept('meta-units'));
  return entries;
}
